#!/usr/bin/env node
// `npm run db:restore <backup>`: put a backup back. Stop the app first.
// SQLite: the backup file replaces the database file (the old one is kept beside it as .before-restore).
// PostgreSQL: pg_restore --clean into DATABASE_URL.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);
const { settings } = require('../lib/db/cli-config.cjs');
const config = settings();
const source = process.argv[2] && path.resolve(process.argv[2]);
if (!source || !fs.existsSync(source)) {
  console.error('Usage: npm run db:restore <backup file>');
  process.exit(1);
}
if (config.dialect === 'sqlite') {
  const target = config.storage;
  if (fs.existsSync(target)) fs.renameSync(target, `${target}.before-restore`);
  for (const suffix of ['-wal', '-shm']) fs.rmSync(target + suffix, { force: true });
  fs.copyFileSync(source, target);
  console.log(`Restored ${source} to ${target}`);
} else {
  const r = spawnSync('pg_restore', ['--clean', '--if-exists', '--no-owner', `--dbname=${config.url}`, source], { stdio: 'inherit' });
  if (r.status !== 0) process.exit(r.status ?? 1);
  console.log(`Restored ${source}`);
}
