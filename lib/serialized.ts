/**
 * What JSON carries of a value a loader returns (dates become strings, functions disappear): the
 * type a route's answer has in the browser, derived from the loader's own return type.
 */
export type Serialized<T> = T extends Date
  ? string
  : T extends string | number | boolean | bigint | symbol | null | undefined
    ? T // before `object`: Sequelize brands optional columns as `string & { brand }`
    : T extends (infer U)[]
      ? Serialized<U>[]
      : T extends object
        ? { [K in keyof T as T[K] extends (...args: never[]) => unknown ? never : K]: Serialized<T[K]> }
        : T;
