/**
 * Every integration test file gets a fresh temporary SQLite database built by the real
 * migrations (the same `sequelize-cli db:migrate` the app uses), and its own upload directory.
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll } from 'vitest';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-it-'));
process.env.DATABASE_URL ||= `sqlite:${path.join(dir, 'test.sqlite')}`;
process.env.UPLOAD_DIR = path.join(dir, 'uploads');
process.env.NEXTAUTH_SECRET ||= 'integration-test-secret';
process.env.OUTBOX_WORKER = 'off';
process.env.SMTP_URL ||= 'smtp://127.0.0.1:1125';
process.env.MAILDEV_API ||= 'http://127.0.0.1:1180';

if (process.env.DATABASE_URL.startsWith('sqlite:')) {
  execFileSync(process.execPath, [path.resolve('node_modules/sequelize-cli/lib/sequelize'), 'db:migrate'], {
    env: process.env,
    stdio: 'pipe',
  });
}

afterAll(async () => {
  const { closeDatabase } = await import('@/lib/db');
  await closeDatabase();
  fs.rmSync(dir, { recursive: true, force: true });
});
