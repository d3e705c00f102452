/**
 * Every API route handler, found from the code at test time (app/api/**\/route.ts), so a new
 * route or method shows up in the tests that enumerate them without anyone remembering to add it.
 */
import fs from 'node:fs';
import path from 'node:path';

export const HTTP_METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
export type HttpMethod = (typeof HTTP_METHODS)[number];
export type Handler = (request: Request, context: unknown) => Promise<Response>;

export interface RouteFile {
  /** The URL pattern as Next names it, e.g. /api/courses/[courseId]. */
  pattern: string;
  /** app/api/…/route.ts, relative to the repository. */
  file: string;
  source: string;
}

const ROOT = path.resolve(__dirname, '../..');

export function routeFiles(): RouteFile[] {
  const base = path.join(ROOT, 'app/api');
  return (fs.readdirSync(base, { recursive: true }) as string[])
    .map((f) => f.split(path.sep).join('/'))
    .filter((f) => f === 'route.ts' || f.endsWith('/route.ts'))
    .sort()
    .map((f) => ({
      pattern: `/api/${f.replace(/\/?route\.ts$/, '')}`.replace(/\/$/, ''),
      file: `app/api/${f}`,
      source: fs.readFileSync(path.join(base, f), 'utf8'),
    }));
}

export interface RouteHandler extends RouteFile {
  method: HttpMethod;
  key: string;
  handler: Handler;
}

/** Imports each route module and lists its exported HTTP method handlers as "METHOD /pattern". */
export async function routeHandlers(): Promise<RouteHandler[]> {
  const out: RouteHandler[] = [];
  for (const f of routeFiles()) {
    const mod = (await import(path.join(ROOT, f.file))) as Record<string, unknown>;
    for (const method of HTTP_METHODS) {
      if (typeof mod[method] === 'function') out.push({ ...f, method, key: `${method} ${f.pattern}`, handler: mod[method] as Handler });
    }
    // HEAD / OPTIONS exports would escape the tables below: refuse them until they have entries.
    for (const other of ['HEAD', 'OPTIONS'])
      if (typeof mod[other] === 'function')
        out.push({ ...f, method: other as HttpMethod, key: `${other} ${f.pattern}`, handler: mod[other] as Handler });
  }
  return out;
}

/** Files (outside node_modules and build output) that declare server actions. */
export function serverActionFiles(): string[] {
  const hits: string[] = [];
  for (const dir of ['app', 'lib', 'components']) {
    const base = path.join(ROOT, dir);
    if (!fs.existsSync(base)) continue;
    for (const f of fs.readdirSync(base, { recursive: true }) as string[]) {
      if (!/\.(t|j)sx?$/.test(f)) continue;
      const text = fs.readFileSync(path.join(base, f), 'utf8');
      if (/^\s*['"]use server['"]/m.test(text)) hits.push(`${dir}/${f.split(path.sep).join('/')}`);
    }
  }
  return hits.sort();
}

/** The database's contents, one hash per table (SELECT * ORDER BY primary key), to prove nothing was written. */
export async function tableChecksums(): Promise<Record<string, string>> {
  const crypto = await import('node:crypto');
  const { sequelize } = await import('@/lib/db');
  const db = sequelize();
  const qi = db.getQueryInterface();
  const tables = ((await qi.showAllTables()) as (string | { tableName: string })[])
    .map((t) => (typeof t === 'string' ? t : t.tableName))
    .sort();
  if (db.getDialect() === 'sqlite') {
    // AUTOINCREMENT counters: a rolled-back insert must not move them either.
    const [seq] = await db.query("SELECT name FROM sqlite_master WHERE type = 'table' AND name = 'sqlite_sequence'");
    if ((seq as unknown[]).length) tables.push('sqlite_sequence');
  }
  const out: Record<string, string> = {};
  for (const table of tables) {
    let order: string[];
    if (table === 'sqlite_sequence') order = ['name'];
    else {
      const cols = await qi.describeTable(table);
      order = Object.entries(cols)
        .filter(([, c]) => c.primaryKey)
        .map(([n]) => n);
      if (!order.length) order = Object.keys(cols);
    }
    const [rows] = await db.query(`SELECT * FROM "${table}" ORDER BY ${order.map((c) => `"${c}"`).join(', ')}`);
    out[table] = `${(rows as unknown[]).length}:${crypto.createHash('sha256').update(JSON.stringify(rows)).digest('hex')}`;
  }
  return out;
}

/** Every file under a directory (recursively), with size and mtime, to prove nothing was left behind. */
export function dirListing(dir: string): string[] {
  if (!fs.existsSync(dir)) return [];
  return (fs.readdirSync(dir, { recursive: true }) as string[])
    .map((f) => {
      const st = fs.statSync(path.join(dir, f));
      return st.isDirectory() ? `${f}/` : `${f} ${st.size} ${st.mtimeMs}`;
    })
    .sort();
}
