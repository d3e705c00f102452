import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { Sequelize, QueryTypes } from 'sequelize';

const cli = path.resolve('node_modules/sequelize-cli/lib/sequelize');
const REQUIRED_TABLES = [
  'users',
  'courses',
  'cohorts',
  'course_memberships',
  'ta_assignments',
  'practicals',
  'practical_cohorts',
  'quantity_definitions',
  'tolerance_bands',
  'submissions',
  'submitted_values',
  'line_assignments',
  'uploads',
  'check_results',
  'slip_findings',
  'marks',
  'moderations',
  'feedback_documents',
  'email_outbox',
  'audit_log',
  'one_time_tokens',
  'sign_in_failures',
  'lti_tool_keys',
  'lti_registrations',
  'lti_deployments',
  'lti_contexts',
  'lti_resource_links',
  'lti_line_items',
  'lti_user_links',
  'lti_launch_states',
  'lti_score_outbox',
];

describe('migrations', () => {
  it('run up and down on an empty database', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-mig-'));
    const file = path.join(dir, 'm.sqlite');
    const env = { ...process.env, DATABASE_URL: `sqlite:${file}` };
    const tables = async () => {
      const s = new Sequelize({ dialect: 'sqlite', storage: file, logging: false });
      const rows = await s.query<{ name: string }>("SELECT name FROM sqlite_master WHERE type = 'table'", { type: QueryTypes.SELECT });
      await s.close();
      return rows.map((r) => r.name).filter((n) => n !== 'SequelizeMeta' && !n.startsWith('sqlite_'));
    };
    execFileSync(process.execPath, [cli, 'db:migrate'], { env, stdio: 'pipe' });
    expect((await tables()).sort()).toEqual(expect.arrayContaining(REQUIRED_TABLES));
    execFileSync(process.execPath, [cli, 'db:migrate:undo:all'], { env, stdio: 'pipe' });
    expect(await tables()).toEqual([]);
    execFileSync(process.execPath, [cli, 'db:migrate'], { env, stdio: 'pipe' });
    expect((await tables()).length).toBeGreaterThanOrEqual(REQUIRED_TABLES.length);
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it.skipIf(!process.env.DATABASE_URL?.startsWith('sqlite:'))(
    'the app connection uses WAL, foreign keys and a busy timeout on SQLite',
    async () => {
      const { sequelize } = await import('@/lib/db');
      const s = sequelize();
      const [mode] = await s.query<{ journal_mode: string }>('PRAGMA journal_mode', { type: QueryTypes.SELECT });
      const [fk] = await s.query<{ foreign_keys: number }>('PRAGMA foreign_keys', { type: QueryTypes.SELECT });
      const [busy] = await s.query<Record<string, number>>('PRAGMA busy_timeout', { type: QueryTypes.SELECT });
      expect(mode.journal_mode).toBe('wal');
      expect(fk.foreign_keys).toBe(1);
      expect(Object.values(busy)[0]).toBeGreaterThanOrEqual(1000);
    },
  );
});
