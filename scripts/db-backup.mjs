#!/usr/bin/env node
// `npm run db:backup [file]`: a consistent online copy of the database while the app keeps running.
// SQLite: VACUUM INTO writes a transactionally consistent snapshot (readers and the WAL writer carry on).
// PostgreSQL: pg_dump in custom format.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);
const { settings } = require('../lib/db/cli-config.cjs');
const config = settings();
const stamp = new Date().toISOString().replace(/[:.]/g, '-');

if (config.dialect === 'sqlite') {
  const target = path.resolve(process.argv[2] || path.join('data', 'backups', `oscillab-${stamp}.sqlite`));
  fs.mkdirSync(path.dirname(target), { recursive: true });
  if (fs.existsSync(target)) {
    console.error(`Refusing to overwrite ${target}.`);
    process.exit(1);
  }
  const sqlite3 = require('sqlite3');
  const db = new sqlite3.Database(config.storage, sqlite3.OPEN_READONLY);
  db.configure('busyTimeout', 10000);
  db.run('VACUUM INTO ?', [target], (err) => {
    db.close();
    if (err) {
      console.error(`Backup failed: ${err.message}`);
      process.exit(1);
    }
    console.log(`Backup written to ${target}`);
  });
} else {
  const target = path.resolve(process.argv[2] || path.join('data', 'backups', `oscillab-${stamp}.dump`));
  fs.mkdirSync(path.dirname(target), { recursive: true });
  const r = spawnSync('pg_dump', ['--format=custom', `--file=${target}`, config.url], { stdio: 'inherit' });
  if (r.status !== 0) process.exit(r.status ?? 1);
  console.log(`Backup written to ${target}`);
}
