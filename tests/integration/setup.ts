/**
 * Every integration test file gets a fresh database built by the real migrations (the same
 * `sequelize-cli db:migrate` the app uses) and its own upload directory. By default that is a
 * temporary SQLite file; with OSCILLAB_PG_ADMIN_URL set (scripts/test.sh does, for its PostgreSQL
 * run) it is a new PostgreSQL database on that server.
 */
import { execFileSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll } from 'vitest';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-it-'));
const pgAdmin = process.env.OSCILLAB_PG_ADMIN_URL;
const pgName = `oscillab_it_${crypto.randomBytes(6).toString('hex')}`;

function psql(sql: string) {
  execFileSync('psql', [pgAdmin!, '-q', '-v', 'ON_ERROR_STOP=1', '-c', sql], { stdio: 'pipe' });
}

if (pgAdmin) {
  psql(`CREATE DATABASE ${pgName}`);
  const url = new URL(pgAdmin);
  url.pathname = `/${pgName}`;
  process.env.DATABASE_URL = url.toString();
} else {
  process.env.DATABASE_URL = `sqlite:${path.join(dir, 'test.sqlite')}`;
}
process.env.UPLOAD_DIR = path.join(dir, 'uploads');
process.env.NEXTAUTH_SECRET ||= 'integration-test-secret';
process.env.OUTBOX_WORKER = 'off';
process.env.SMTP_URL ||= 'smtp://127.0.0.1:1125';
process.env.MAILDEV_API ||= 'http://127.0.0.1:1180';

execFileSync(process.execPath, [path.resolve('node_modules/sequelize-cli/lib/sequelize'), 'db:migrate'], {
  env: process.env,
  stdio: 'pipe',
});

afterAll(async () => {
  // An outbox run a route started in the background (deliverSoon) finishes before the database goes.
  const { deliverySettled } = await import('@/lib/mail/outbox');
  await deliverySettled();
  const { closeDatabase } = await import('@/lib/db');
  await closeDatabase();
  fs.rmSync(dir, { recursive: true, force: true });
  // FORCE: a server process whose client has just disconnected may not have ended yet, and a plain
  // DROP then fails with "being accessed by other users" (the database is this file's own).
  if (pgAdmin) psql(`DROP DATABASE IF EXISTS ${pgName} WITH (FORCE)`);
});
