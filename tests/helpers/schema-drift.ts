/**
 * Compares a Sequelize model with the table the migrations built: columns, their types,
 * nullability and defaults, and the table's indexes (unique or not, columns in order, and the name
 * of every index the model declares). Returns one readable line per difference; [] when they agree.
 *
 * Types are compared as the connected dialect writes them: the model's type is rendered with
 * `toSql()` and the database's own spelling is mapped onto that vocabulary (PostgreSQL reports
 * VARCHAR as CHARACTER VARYING and FLOAT as DOUBLE PRECISION).
 */
import { Utils, type ModelStatic, type Model, type QueryInterface } from 'sequelize';

type DbColumn = { type: string; allowNull: boolean; defaultValue?: unknown; primaryKey: boolean };
type DbIndex = { name: string; unique: boolean; primary: boolean; fields: { attribute: string }[] };
type ModelIndex = { name?: string; unique?: boolean; fields: (string | { name?: string; attribute?: string })[] };
type SqlType = { toSql?: () => string; key?: string };

const TYPE_SPELLINGS: Record<string, [RegExp, string][]> = {
  postgres: [
    [/^CHARACTER VARYING/, 'VARCHAR'],
    [/^DOUBLE PRECISION$/, 'FLOAT'],
  ],
  sqlite: [],
};

function dbType(dialect: string, type: string): string {
  let t = type.toUpperCase().trim();
  for (const [pattern, replacement] of TYPE_SPELLINGS[dialect] ?? []) t = t.replace(pattern, replacement);
  return t;
}

function modelType(type: unknown): string {
  const t = type as SqlType;
  return (typeof t.toSql === 'function' ? t.toSql() : String(t.key ?? t)).toUpperCase().trim();
}

/** A default as the database reports it, read as the model's type would read it. */
function dbDefault(value: unknown, type: string): unknown {
  if (value === null || value === undefined) return undefined;
  if (typeof value !== 'string') return value;
  if (/^(BOOLEAN|TINYINT\(1\))$/.test(type)) return value === '1' || value.toLowerCase() === 'true';
  if (/^(INTEGER|BIGINT|FLOAT|REAL|DOUBLE|DECIMAL)/.test(type)) return Number(value);
  return value;
}

const indexKey = (unique: boolean, fields: string[]) => `${unique ? 'unique ' : ''}index (${fields.join(', ')})`;
const fieldName = (f: ModelIndex['fields'][number]) => (typeof f === 'string' ? f : (f.name ?? f.attribute ?? ''));

export async function schemaDrift(model: ModelStatic<Model>, qi: QueryInterface): Promise<string[]> {
  const dialect = qi.sequelize.getDialect();
  const table = model.getTableName() as string;
  const out: string[] = [];
  const columns = (await qi.describeTable(table)) as unknown as Record<string, DbColumn>;
  const attributes = model.getAttributes();

  const byField = new Map(Object.entries(attributes).map(([name, a]) => [a.field ?? name, a]));
  for (const field of Object.keys(columns)) if (!byField.has(field)) out.push(`${table}.${field}: in the database, not in the model`);
  for (const [field, a] of byField) {
    const column = columns[field];
    if (!column) {
      out.push(`${table}.${field}: in the model, not in the database`);
      continue;
    }
    const wantType = modelType(a.type);
    const haveType = dbType(dialect, column.type);
    if (wantType !== haveType) out.push(`${table}.${field}: type ${haveType} in the database, ${wantType} in the model`);
    if (Boolean(a.primaryKey) !== Boolean(column.primaryKey))
      out.push(`${table}.${field}: primary key ${column.primaryKey ? 'in the database only' : 'in the model only'}`);
    // SQLite reports an INTEGER PRIMARY KEY (the rowid) as nullable; a primary key never holds NULL.
    const dbNullable = column.primaryKey ? false : column.allowNull;
    const modelNullable = a.primaryKey ? false : a.allowNull !== false;
    if (dbNullable !== modelNullable)
      out.push(
        `${table}.${field}: ${dbNullable ? 'nullable' : 'NOT NULL'} in the database, ${modelNullable ? 'nullable' : 'NOT NULL'} in the model`,
      );
    if (!a.autoIncrement && !column.primaryKey) {
      const have = dbDefault(column.defaultValue, haveType);
      const want = a.defaultValue ?? undefined;
      if (have !== want)
        out.push(
          `${table}.${field}: default ${JSON.stringify(have) ?? 'none'} in the database, ${JSON.stringify(want) ?? 'none'} in the model`,
        );
    }
  }

  // Indexes: the model lists them in its options (named as the migration names them) and marks
  // single-column UNIQUE constraints on the attribute; the primary key is left to the columns above.
  const dbIndexes = ((await qi.showIndex(table)) as unknown as DbIndex[]).filter((i) => !i.primary);
  const declared = ((model.options.indexes ?? []) as ModelIndex[]).map((i) => ({
    name: i.name ?? defaultIndexName(table, i.fields.map(fieldName)),
    key: indexKey(Boolean(i.unique), i.fields.map(fieldName)),
  }));
  const uniqueColumns = [...byField]
    .filter(([, a]) => a.unique === true || typeof a.unique === 'string')
    .map(([field]) => indexKey(true, [field]));
  const want = [...declared.map((d) => d.key), ...uniqueColumns].sort();
  const have = dbIndexes
    .map((i) =>
      indexKey(
        i.unique,
        i.fields.map((f) => f.attribute),
      ),
    )
    .sort();
  for (const k of difference(have, want)) out.push(`${table}: ${k} in the database, not in the model`);
  for (const k of difference(want, have)) out.push(`${table}: ${k} in the model, not in the database`);
  const dbNames = new Map(
    dbIndexes.map((i) => [
      i.name,
      indexKey(
        i.unique,
        i.fields.map((f) => f.attribute),
      ),
    ]),
  );
  for (const d of declared) {
    if (have.includes(d.key) && dbNames.get(d.name) !== d.key)
      out.push(`${table}: the model names ${d.key} "${d.name}", the database does not`);
  }
  return out;
}

/** Sequelize's own name for an unnamed index (queryInterface.addIndex and model indexes alike). */
function defaultIndexName(table: string, fields: string[]): string {
  const { nameIndex } = Utils as unknown as { nameIndex: (index: { fields: string[] }, table: string) => { name: string } };
  return nameIndex({ fields }, table).name;
}

/** Multiset difference a − b. */
function difference(a: string[], b: string[]): string[] {
  const left = [...b];
  return a.filter((x) => {
    const i = left.indexOf(x);
    if (i === -1) return true;
    left.splice(i, 1);
    return false;
  });
}
