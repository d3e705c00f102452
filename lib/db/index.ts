import { Sequelize, type Options } from 'sequelize';
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
    pool: { max: 1, min: 0, idle: 60000 },
  });
  sequelize.addHook('afterConnect', async (connection: unknown) => {
    const db = connection as { exec: (sql: string, cb: (err: Error | null) => void) => void };
    await new Promise<void>((resolve, reject) =>
      db.exec('PRAGMA journal_mode = WAL; PRAGMA foreign_keys = ON; PRAGMA busy_timeout = 5000; PRAGMA synchronous = NORMAL;', (err) =>
        err ? reject(err) : resolve(),
      ),
    );
  });
  return sequelize;
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
