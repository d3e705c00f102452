import 'server-only';
import { AsyncLocalStorage } from 'node:async_hooks';
import { QueryTypes, Sequelize, Transaction, type Options } from 'sequelize';
import cliConfig from './cli-config.cjs';

type Settings = Options & { url?: string };

/** Build a Sequelize instance from DATABASE_URL (SQLite file under data/ by default). */
export function createSequelize(): Sequelize {
  const settings = (cliConfig as { settings: () => Settings }).settings();
  const pool = { max: 5, min: 0, idle: 10000 };
  if (settings.url) return new Sequelize(settings.url, { logging: false, pool });

  const sequelize = new Sequelize({
    dialect: 'sqlite',
    storage: settings.storage,
    logging: false,
    // SQLite allows one writer at a time; retry instead of failing while another write holds the lock.
    retry: { max: 8, match: [/SQLITE_BUSY/] },
    // A deferred transaction that reads first and writes later fails at once (SQLITE_BUSY, no
    // wait) when another connection wrote in between; IMMEDIATE takes the write lock at BEGIN,
    // where the busy timeout makes it wait its turn instead.
    transactionType: Transaction.TYPES.IMMEDIATE,
    pool: { max: 1, min: 0, idle: 60000 },
  });
  preparePerConnection(sequelize);
  reuseTransactionConnections(sequelize);
  oneWriterAtATime(sequelize);
  return sequelize;
}

/**
 * State that must be one per process, not one per copy of this module: Next bundles this file
 * into several server chunks (instrumentation, route handlers, pages), each with its own module
 * instance, while the Sequelize instance and Transaction.prototype are shared. Work queued by one
 * copy must be found by the commit patch another copy installed.
 */
function processWide<T>(name: string, make: () => T): T {
  const store = globalThis as unknown as Record<symbol, T | undefined>;
  const key = Symbol.for(`oscillab.db.${name}`);
  return (store[key] ??= make());
}

/**
 * node-sqlite3 runs every statement on libuv's small thread pool (4 threads), and a statement
 * waiting for SQLite's write lock sleeps in the busy handler on one of those threads. With more
 * waiters than threads the lock holder cannot run its next statement or COMMIT, and everything
 * stalls until busy timeouts expire (8 concurrent transactions: ~10 s; 50: minutes). So within
 * one process, transactions and writes outside a transaction take turns here, in arrival order,
 * before they reach SQLite; the busy timeout is left for writers in other processes.
 * Re-entrant: a query issued inside a transaction's callback runs at once.
 */
const holding = processWide('writerTurn', () => new AsyncLocalStorage<true>());

/** True while this async context holds SQLite's writer turn in this process (see oneWriterAtATime). */
export const holdsWriterTurn = (): boolean => holding.getStore() === true;

/** Run fn outside the current writer turn, so it queues behind it instead of re-entering it. */
export function outsideWriterTurn<T>(fn: () => T): T {
  return holding.exit(fn);
}

function oneWriterAtATime(sequelize: Sequelize): void {
  let tail: Promise<unknown> = Promise.resolve();
  const exclusive = <T>(fn: () => Promise<T>): Promise<T> => {
    if (holding.getStore()) return fn();
    const run = tail.then(() => holding.run(true, fn));
    tail = run.catch(() => undefined);
    return run;
  };
  const s = sequelize as unknown as {
    transaction: (...args: unknown[]) => Promise<unknown>;
    query: (...args: unknown[]) => Promise<unknown>;
  };
  const transaction = s.transaction.bind(sequelize);
  s.transaction = (...args: unknown[]) => {
    const managed = args.some((a) => typeof a === 'function');
    return managed ? exclusive(() => transaction(...args)) : transaction(...args);
  };
  const query = s.query.bind(sequelize);
  const READS: string[] = [QueryTypes.SELECT, QueryTypes.SHOWTABLES, QueryTypes.SHOWINDEXES, QueryTypes.DESCRIBE];
  s.query = (...args: unknown[]) => {
    const options = (args[1] ?? {}) as { transaction?: unknown; type?: string };
    const read = options.type !== undefined && READS.includes(options.type);
    return read || options.transaction ? query(...args) : exclusive(() => query(...args));
  };
}

type SqliteConnection = { exec: (sql: string, cb: (err: Error | null) => void) => void };
const SQLITE_PRAGMAS = 'PRAGMA journal_mode = WAL; PRAGMA foreign_keys = ON; PRAGMA busy_timeout = 5000; PRAGMA synchronous = NORMAL;';

/**
 * Sequelize's SQLite dialect opens a new connection per transaction and runs no connect hooks,
 * so the pragmas (WAL journal, foreign keys, busy timeout) are applied to each new connection here.
 */
function preparePerConnection(sequelize: Sequelize): void {
  const manager = sequelize.connectionManager as unknown as { getConnection: (o: unknown) => Promise<SqliteConnection> };
  const open = manager.getConnection.bind(manager);
  const prepared = new WeakSet<object>();
  manager.getConnection = async (options: unknown) => {
    const connection = await open(options);
    if (!prepared.has(connection)) {
      prepared.add(connection);
      await new Promise<void>((resolve, reject) => connection.exec(SQLITE_PRAGMAS, (err) => (err ? reject(err) : resolve())));
      rememberColumnTypes(connection);
    }
    return connection;
  };
}

type Callback = (err: Error | null, rows?: unknown) => void;
type StatementMethods = Record<'all' | 'run' | 'exec' | 'get' | 'each' | 'prepare', (sql: string, ...rest: unknown[]) => unknown>;
const columnTypes = new Map<string, unknown[]>();
const TABLE_INFO = /^PRAGMA table_info\(`([^`]+)`\)$/;
const SCHEMA_CHANGE = /^\s*(CREATE|ALTER|DROP)\b/i;

/**
 * Before every model SELECT, Sequelize's SQLite dialect asks `PRAGMA table_info` for the table's
 * column types (to parse dates and JSON): one extra statement per query. The answers are kept for
 * the process and forgotten whenever a statement through any connection changes the schema (the
 * migrations run in-process by the tests; a server is restarted after `db:migrate` anyway, since
 * its models are fixed when it starts).
 */
function rememberColumnTypes(connection: SqliteConnection): void {
  const c = connection as unknown as StatementMethods;
  for (const method of ['all', 'run', 'exec', 'get', 'each', 'prepare'] as const) {
    const original = c[method].bind(connection);
    c[method] = (sql: string, ...rest: unknown[]) => {
      if (typeof sql === 'string' && SCHEMA_CHANGE.test(sql)) columnTypes.clear();
      return original(sql, ...rest);
    };
  }
  const all = c.all.bind(connection);
  c.all = (sql: string, ...rest: unknown[]) => {
    const table = typeof sql === 'string' ? TABLE_INFO.exec(sql)?.[1] : undefined;
    const callback = rest[rest.length - 1];
    if (!table || typeof callback !== 'function') return all(sql, ...rest);
    const known = columnTypes.get(table);
    if (known) {
      process.nextTick(() =>
        (callback as Callback)(
          null,
          known.map((row) => ({ ...(row as object) })),
        ),
      );
      return connection;
    }
    return all(sql, ...rest.slice(0, -1), (err: Error | null, rows: unknown[]) => {
      if (!err && Array.isArray(rows) && rows.length) columnTypes.set(table, rows);
      (callback as Callback)(err, rows);
    });
  };
}

type PooledConnection = SqliteConnection & { uuid?: string; filename?: string; close: (cb?: (err: Error | null) => void) => void };

/**
 * Sequelize's SQLite dialect opens a new connection for every transaction and closes it after
 * COMMIT; opening one (file, pragmas, schema parse) costs more than the statements of a typical
 * transaction (measured: a one-read transaction 4.9 ms, the read alone 1.4 ms). Transactions take
 * turns in this process (oneWriterAtATime), so a connection whose transaction ended normally is
 * kept and handed to the next one. A transaction that failed to commit or roll back has its
 * connection destroyed by Sequelize (forceCleanup), never returned here.
 */
function reuseTransactionConnections(sequelize: Sequelize): void {
  const manager = sequelize.connectionManager as unknown as {
    connections: Record<string, PooledConnection>;
    getConnection: (o?: { uuid?: string }) => Promise<PooledConnection>;
    releaseConnection: (c: PooledConnection, force?: boolean) => unknown;
    _onProcessExit: () => Promise<unknown>;
  };
  const spare: PooledConnection[] = [];
  const KEEP = 2;
  const forTransaction = (uuid: string | undefined): uuid is string => !!uuid && uuid !== 'default';
  const open = manager.getConnection.bind(manager);
  const release = manager.releaseConnection.bind(manager);
  const exit = manager._onProcessExit.bind(manager);
  manager.getConnection = async (options) => {
    const reused = forTransaction(options?.uuid) ? spare.pop() : undefined;
    if (!reused) return open(options);
    manager.connections[options!.uuid!] = reused;
    return reused;
  };
  manager.releaseConnection = (connection, force) => {
    if (!force && forTransaction(connection.uuid) && connection.filename !== ':memory:' && spare.length < KEEP) {
      delete manager.connections[connection.uuid];
      spare.push(connection);
      return;
    }
    return release(connection, force);
  };
  manager._onProcessExit = async () => {
    await Promise.all(spare.splice(0).map((c) => new Promise<void>((resolve) => c.close(() => resolve()))));
    return exit();
  };
}

type BeforeCommit = (t: Transaction) => Promise<void>;
const beforeCommitWork = processWide('beforeCommitWork', () => new WeakMap<Transaction, BeforeCommit[]>());

/** The outermost transaction (a savepoint's work commits with it). */
export function rootTransaction(t: Transaction): Transaction {
  let root = t;
  while ((root as unknown as { parent?: Transaction }).parent) root = (root as unknown as { parent: Transaction }).parent;
  return root;
}

/**
 * Work that must run inside a transaction, after everything else in it and just before COMMIT
 * (the kept statistics are brought up to date there, once per transaction, whatever changed).
 * If the work fails, the transaction is rolled back and the error reaches the caller.
 */
export function beforeCommit(t: Transaction, fn: BeforeCommit): void {
  const root = rootTransaction(t);
  const list = beforeCommitWork.get(root);
  if (list) list.push(fn);
  else beforeCommitWork.set(root, [fn]);
}

const transactionProto = Transaction.prototype as unknown as {
  commit: () => Promise<void>;
  rollback: () => Promise<void>;
  __oscillabBeforeCommit?: true;
  finished?: string;
  parent?: unknown;
};
if (!transactionProto.__oscillabBeforeCommit) {
  const commit = transactionProto.commit;
  transactionProto.commit = async function (this: Transaction & { finished?: string; parent?: unknown; rollback: () => Promise<void> }) {
    if (!this.parent) {
      // Work may queue more work (rarely): run until none is left.
      for (let list = beforeCommitWork.get(this); list && list.length; list = beforeCommitWork.get(this)) {
        beforeCommitWork.delete(this);
        try {
          for (const fn of list) await fn(this);
        } catch (error) {
          beforeCommitWork.delete(this);
          if (!this.finished) await this.rollback().catch(() => undefined);
          throw error;
        }
      }
    }
    return commit.call(this);
  };
  transactionProto.__oscillabBeforeCommit = true;
}

const globalForDb = globalThis as unknown as { oscillabSequelize?: Sequelize };

export function sequelize(): Sequelize {
  if (!globalForDb.oscillabSequelize) globalForDb.oscillabSequelize = createSequelize();
  return globalForDb.oscillabSequelize;
}

/** Forget the cached connection (tests switch databases between files). */
export async function closeDatabase(): Promise<void> {
  const s = globalForDb.oscillabSequelize;
  globalForDb.oscillabSequelize = undefined;
  if (s) await s.close();
}

export const isSqlite = () => sequelize().getDialect() === 'sqlite';
