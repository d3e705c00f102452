import { Sequelize, Transaction, type Options } from 'sequelize';
// eslint-disable-next-line @typescript-eslint/no-require-imports
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
  return sequelize;
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
    }
    return connection;
  };
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
