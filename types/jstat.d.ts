// The few jStat functions Oscillab uses (jstat ships no type declarations).
declare module 'jstat' {
  export const centralF: { cdf(x: number, df1: number, df2: number): number };
  export const normal: { cdf(x: number, mean: number, std: number): number };
  export const studentt: { cdf(x: number, dof: number): number; inv(p: number, dof: number): number };
}
