#!/usr/bin/env node
// `npm run demo`: migrate, seed, build, then run the app on :3000, the mail catcher on :1025/:1080 and
// the learning-platform stand-in on 127.0.0.1:3030 (FAKE_PLATFORM_PORT), each in its own process.
import { spawn, spawnSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);
const { DEMO_PASSWORD } = require('../seeders/data/demo-cast.cjs');

// The demo seeds through tsx and catches mail with maildev, both development dependencies.
for (const tool of ['tsx', 'maildev']) {
  if (!fs.existsSync(path.join('node_modules', tool, 'package.json'))) {
    console.error(
      `The demo needs ${tool}, a development dependency: run \`npm install\` (a production install, \`npm ci --omit=dev\`, leaves it out).`,
    );
    process.exit(1);
  }
}

const run = (cmd, args, env = {}) => {
  const r = spawnSync(cmd, args, { stdio: 'inherit', env: { ...process.env, ...env } });
  if (r.status !== 0) process.exit(r.status ?? 1);
};

fs.mkdirSync('data', { recursive: true });
const secretFile = path.join('data', '.session-secret');
if (!fs.existsSync(secretFile)) fs.writeFileSync(secretFile, crypto.randomBytes(32).toString('hex'), { mode: 0o600 });
const platformPort = process.env.FAKE_PLATFORM_PORT || '3030';
const platformUrl = `http://127.0.0.1:${platformPort}`;
const env = {
  LTI_DEMO_PLATFORM_URL: platformUrl,
  NEXTAUTH_SECRET: process.env.NEXTAUTH_SECRET || fs.readFileSync(secretFile, 'utf8').trim(),
  NEXTAUTH_URL: process.env.NEXTAUTH_URL || 'http://localhost:3000',
  SMTP_URL: process.env.SMTP_URL || 'smtp://127.0.0.1:1025',
  NEXT_TELEMETRY_DISABLED: '1',
};

console.log('\n▸ Migrating the database');
run('npx', ['sequelize-cli', 'db:migrate'], env);
console.log('\n▸ Seeding the demo (Northmere University, a fictional university)');
run('npm', ['run', '--silent', 'db:seed'], env);
if (process.env.SKIP_BUILD !== '1') {
  console.log('\n▸ Building the app');
  run('npm', ['run', '--silent', 'build'], env);
}

/** The seeded practical the stand-in's first item opens (placed as deep linking would have placed it). */
async function demoPracticalId() {
  const { Sequelize, QueryTypes } = require('sequelize');
  const { settings } = require('../lib/db/cli-config.cjs');
  const s = settings();
  const db = s.url ? new Sequelize(s.url, { logging: false }) : new Sequelize({ dialect: 'sqlite', storage: s.storage, logging: false });
  try {
    const rows = await db.query(
      `SELECT p.id FROM practicals p JOIN courses c ON c.id = p."courseId" WHERE c.code = 'CHEM2041' AND p.title = 'HCl/DCl fundamental band' AND p."copiedFromId" IS NULL ORDER BY p.id`,
      { type: QueryTypes.SELECT },
    );
    return rows[0] ? String(rows[0].id) : '';
  } finally {
    await db.close();
  }
}

const DEMO_HOST = process.env.HOST || '127.0.0.1';
const children = [
  spawn(process.execPath, ['scripts/maildev.mjs', '1025', '1080'], { stdio: ['ignore', 'ignore', 'inherit'] }),
  // Loopback only unless HOST says otherwise: the demo accounts share a published password.
  spawn('npx', ['next', 'start', '-p', '3000', '-H', DEMO_HOST], { stdio: 'inherit', env: { ...process.env, ...env } }),
  spawn(process.execPath, ['--import', 'tsx', 'scripts/fake-platform.ts'], {
    stdio: 'inherit',
    env: {
      ...process.env,
      FAKE_PLATFORM_PORT: platformPort,
      OSCILLAB_URL: env.NEXTAUTH_URL,
      FAKE_PLATFORM_STATE: process.env.FAKE_PLATFORM_STATE || path.join('data', 'fake-platform.json'),
      FAKE_PLATFORM_DEMO_PRACTICAL: await demoPracticalId(),
    },
  }),
];
const stop = () => {
  for (const c of children) c.kill('SIGTERM');
  process.exit(0);
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);

const accounts = [
  ['Site administrator', 'admin@northmere.example'],
  ['Course lead (CHEM2041)', 'lead@northmere.example'],
  ['Instructor (CHEM2041; also TA in PHYS2310)', 'instructor1@northmere.example'],
  ['Instructor and course lead (PHYS2310)', 'instructor2@northmere.example'],
  ['Teaching assistants', 'ta1@ … ta4@northmere.example'],
  ['Students (60)', 'student01@ … student60@northmere.example'],
];
setTimeout(() => {
  console.log('\n────────────────────────────────────────────────────────────');
  console.log(' Oscillab demo is running');
  console.log(`   App:        http://localhost:3000   (sign in there; listening on ${DEMO_HOST} only)`);
  console.log('   Mail inbox: http://localhost:1080   (invitations and feedback land here)');
  console.log(
    `   Learning platform (local stand-in): ${platformUrl}   (launch into Oscillab as its instructor or students; scores come back to its gradebook)`,
  );
  console.log(`   Password for every demo account: ${DEMO_PASSWORD}`);
  for (const [role, email] of accounts) console.log(`   ${role.padEnd(44)} ${email}`);
  console.log(' Stop with Ctrl+C.');
  console.log('────────────────────────────────────────────────────────────\n');
}, 2500);
