import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { QueryTypes, Sequelize } from 'sequelize';
import { sequelize } from '@/lib/db';
import { models } from '@/models';
import { buildWorld } from '../helpers/world';

/** A checksum of every row of every table, to compare two databases. */
async function tableChecksums(s: Sequelize): Promise<Record<string, string>> {
  const tables = await s.query<{ name: string }>(
    "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name",
    { type: QueryTypes.SELECT },
  );
  const out: Record<string, string> = {};
  const { createHash } = await import('node:crypto');
  for (const { name } of tables) {
    const rows = await s.query(`SELECT * FROM "${name}" ORDER BY 1`, { type: QueryTypes.SELECT });
    out[name] = createHash('sha256').update(JSON.stringify(rows)).digest('hex');
  }
  return out;
}

describe('database backup and restore', () => {
  it.skipIf(!process.env.DATABASE_URL?.startsWith('sqlite:'))(
    'copies the database consistently while writes go on, and the restore brings it back',
    async () => {
      await buildWorld();
      const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-backup-'));
      const backup = path.join(dir, 'copy.sqlite');

      // Writes keep arriving while the backup runs.
      let writing = true;
      const writer = (async () => {
        let i = 0;
        while (writing) {
          await models().AuditEntry.create({
            actorId: null,
            action: 'test.tick',
            entityType: 'test',
            entityId: i++,
            before: null,
            after: { i },
          });
        }
      })();
      execFileSync(process.execPath, ['scripts/db-backup.mjs', backup], { env: process.env, stdio: 'pipe' });
      writing = false;
      await writer;

      const copy = new Sequelize({ dialect: 'sqlite', storage: backup, logging: false });
      const [integrity] = await copy.query<{ integrity_check: string }>('PRAGMA integrity_check', { type: QueryTypes.SELECT });
      expect(integrity.integrity_check).toBe('ok');
      const copied = await tableChecksums(copy);
      const ticksInCopy = (await copy.query<{ n: number }>(`SELECT COUNT(*) AS n FROM audit_log`, { type: QueryTypes.SELECT }))[0].n;
      await copy.close();
      expect(Object.keys(copied)).toContain('users');

      // Restore into a fresh location and compare every table with the copy.
      const target = path.join(dir, 'restored.sqlite');
      execFileSync(process.execPath, ['scripts/db-restore.mjs', backup], {
        env: { ...process.env, DATABASE_URL: `sqlite:${target}` },
        stdio: 'pipe',
      });
      const restored = new Sequelize({ dialect: 'sqlite', storage: target, logging: false });
      expect(await tableChecksums(restored)).toEqual(copied);
      await restored.close();

      // The live database has everything the copy has (and the writes after it).
      const liveTicks = (await sequelize().query<{ n: number }>(`SELECT COUNT(*) AS n FROM audit_log`, { type: QueryTypes.SELECT }))[0].n;
      expect(liveTicks).toBeGreaterThanOrEqual(ticksInCopy);
      fs.rmSync(dir, { recursive: true, force: true });
    },
  );
});
