/**
 * HTTP load benchmark: `npm run bench:http -- [seconds=5]`.
 *
 * Needs a production build (`npm run build`; with NEXT_DIST_DIR set, that folder is used). For
 * each size in BENCH_SIZES (default 1000,10000,100000 submissions) it makes a fresh database
 * (migrated, seeded with the Northmere demo, then that many more checked and marked submissions
 * to the HCl/DCl practical, half in each cohort, kept statistics rebuilt), starts the app, signs
 * in as demo users through next-auth's credentials flow, and drives with autocannon at 20 and 100
 * connections:
 *   - draft save   PUT /api/submissions/draft (students of the HCl/DCl practical, round robin)
 *   - queue        GET /api/marking/queue?practicalId=… (a TA of Group A: half the submissions)
 *   - statistics   GET /api/statistics/practicals/<id>?cohortId=<Group A> (the course lead)
 *   - bare         GET /api/health (fixed JSON, no database, no session) — the baseline
 * and then releases a batch of marked submissions through POST /api/release, waits for the
 * outbox workers to deliver, and checks in the mail catcher that every e-mail of the release
 * arrived exactly once (by its X-Oscillab-Outbox-Id).
 *
 * BENCH_DB=postgres: the project's own loopback PostgreSQL (scripts/postgres.sh, OSCILLAB_PG_PORT
 * and OSCILLAB_PG_DIR as for the tests), two app instances on it with the outbox worker on both,
 * and the load spread across them (each autocannon run split in two halves, one per instance,
 * latencies merged). Default: SQLite and one instance (what SQLite suits).
 *
 * Prints per route and concurrency: median and p95 latency, requests/s, errors, p95 as a ratio to
 * the bare route's p95 in the same run, p95 per submission in the database; the peak resident
 * memory of each server process during the run; then the targets. BENCH_PORT=3350 puts the
 * servers and the mail catcher on BENCH_PORT … +3 (free ports otherwise). BENCH_ROUTES="bare,queue"
 * drives only some routes; BENCH_SERVER_NODE_ARGS="--cpu-prof --cpu-prof-dir=/tmp/prof" profiles
 * the servers. Servers, catcher and the PostgreSQL database are always removed at the end.
 */
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
// eslint-disable-next-line @typescript-eslint/no-require-imports -- autocannon ships no ES module entry
const autocannon = require('autocannon');

const SECONDS = Number(process.argv[2] ?? 5);
const SIZES = (process.env.BENCH_SIZES ?? '1000,10000,100000')
  .split(',')
  .map((s) => Number(s.trim()))
  .filter((n) => n > 0);
const POSTGRES = process.env.BENCH_DB === 'postgres';
const INSTANCES = POSTGRES ? 2 : 1;
const RELEASE_BATCH = Number(process.env.BENCH_RELEASE ?? 100);
const serverNodeArgs = (process.env.BENCH_SERVER_NODE_ARGS ?? '').split(/\s+/).filter(Boolean);
const PASSWORD = 'northmere-demo-26';
const distDir = process.env.NEXT_DIST_DIR || '.next';
const children: ChildProcess[] = [];
let pgAdmin: string | null = null;
let pgDatabase: string | null = null;

function stopChildren(signal: NodeJS.Signals = 'SIGTERM') {
  for (const c of children) {
    if (c.exitCode !== null || c.pid === undefined) continue;
    try {
      process.kill(-c.pid, signal); // the whole process group
    } catch {}
  }
}
process.on('exit', () => stopChildren('SIGKILL'));
for (const sig of ['SIGINT', 'SIGTERM'] as const) process.on(sig, () => process.exit(130));

async function freePort(): Promise<number> {
  const s = net.createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', () => r()));
  const port = (s.address() as net.AddressInfo).port;
  await new Promise((r) => s.close(r));
  return port;
}
async function ports(n: number): Promise<number[]> {
  const base = Number(process.env.BENCH_PORT || 0);
  if (base) return Array.from({ length: n }, (_, i) => base + i);
  const out: number[] = [];
  while (out.length < n) {
    const p = await freePort();
    if (!out.includes(p)) out.push(p);
  }
  return out;
}

const load = () =>
  os
    .loadavg()
    .map((x) => x.toFixed(2))
    .join(' ');

type Run = {
  route: string;
  connections: number;
  median: number;
  p95: number;
  rps: number;
  total: number;
  errors: number;
  non2xx: number;
  statuses: Record<string, number>;
};
type Spec = { path: string; method?: string; cookies: string[]; body?: string };

function percentile(sorted: number[], p: number) {
  if (!sorted.length) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1))];
}

/** One autocannon run per instance at the same time, connections split between them; latencies merged. */
async function drive(bases: string[], route: string, connections: number, spec: Spec, seconds = SECONDS): Promise<Run> {
  const latencies: number[] = [];
  const statuses: Record<string, number> = {};
  let errors = 0;
  let non2xx = 0;
  await Promise.all(
    bases.map(async (base, b) => {
      let i = b;
      const share = Math.max(1, Math.round(connections / bases.length));
      const instance = autocannon({
        url: base,
        connections: share,
        duration: seconds,
        timeout: 20,
        requests: [
          {
            method: spec.method ?? 'GET',
            path: spec.path,
            setupRequest: (req: { headers?: Record<string, string> }) => {
              const cookie = spec.cookies[i++ % spec.cookies.length];
              req.headers = {
                ...req.headers,
                origin: base,
                ...(cookie ? { cookie } : {}),
                ...(spec.body ? { 'content-type': 'application/json' } : {}),
              };
              return spec.body ? { ...req, body: spec.body } : req;
            },
          },
        ],
      });
      instance.on('response', (_client: unknown, statusCode: number, _bytes: number, responseTime: number) => {
        latencies.push(responseTime);
        statuses[statusCode] = (statuses[statusCode] ?? 0) + 1;
      });
      const result = await instance;
      errors += result.errors + result.timeouts;
      non2xx += result.non2xx;
    }),
  );
  latencies.sort((a, b) => a - b);
  return {
    route,
    connections,
    median: percentile(latencies, 50),
    p95: percentile(latencies, 95),
    rps: latencies.length / seconds,
    total: latencies.length,
    errors,
    non2xx,
    statuses,
  };
}

/** Wait until every instance answers the bare route promptly again (requests still in flight from the last run). */
async function settle(bases: string[]) {
  for (const base of bases) {
    const end = Date.now() + 60_000;
    let quick = 0;
    while (quick < 3 && Date.now() < end) {
      const t = performance.now();
      await fetch(`${base}/api/health`).then((r) => r.arrayBuffer());
      quick = performance.now() - t < 30 ? quick + 1 : 0;
      await new Promise((r) => setTimeout(r, 100));
    }
  }
}

function setCookies(res: Response): string[] {
  return (res.headers as unknown as { getSetCookie?: () => string[] }).getSetCookie?.() ?? [];
}

async function signIn(base: string, email: string): Promise<string> {
  const csrfRes = await fetch(`${base}/api/auth/csrf`);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const jar = setCookies(csrfRes)
    .map((c) => c.split(';')[0])
    .join('; ');
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: jar, origin: base },
    body: new URLSearchParams({ csrfToken, email, password: PASSWORD, json: 'true' }),
  });
  const session = setCookies(res)
    .map((c) => c.split(';')[0])
    .find((c) => /session-token=/.test(c));
  if (!session) throw new Error(`sign-in failed for ${email}: ${res.status}`);
  return session;
}

/** Peak resident memory of a process group (the server and anything it started), sampled every 200 ms. */
function watchMemory(pid: number) {
  let peak = 0;
  const sample = () => {
    let total = 0;
    for (const entry of fs.readdirSync('/proc')) {
      if (!/^\d+$/.test(entry)) continue;
      try {
        const stat = fs.readFileSync(`/proc/${entry}/stat`, 'utf8');
        const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
        if (Number(fields[2]) !== pid) continue; // process group id
        const rss = /VmRSS:\s+(\d+) kB/.exec(fs.readFileSync(`/proc/${entry}/status`, 'utf8'));
        if (rss) total += Number(rss[1]) * 1024;
      } catch {}
    }
    peak = Math.max(peak, total);
  };
  const timer = setInterval(sample, 200);
  sample();
  return { stop: () => (clearInterval(timer), sample(), peak), peak: () => peak };
}

async function waitForHttp(url: string, child: ChildProcess, what: string, ms = 90_000) {
  const end = Date.now() + ms;
  for (;;) {
    try {
      if ((await fetch(url)).ok) return;
    } catch {}
    if (child.exitCode !== null) throw new Error(`${what} exited (${child.exitCode})`);
    if (Date.now() > end) throw new Error(`${what} did not answer within ${ms / 1000} s`);
    await new Promise((r) => setTimeout(r, 300));
  }
}

function psql(sql: string) {
  execFileSync('psql', [pgAdmin!, '-q', '-v', 'ON_ERROR_STOP=1', '-c', sql], { stdio: 'pipe' });
}

/** The database for one size: migrated, demo seeded, `size` more submissions, kept statistics rebuilt. */
async function prepareDatabase(size: number, dir: string): Promise<string> {
  let url: string;
  if (POSTGRES) {
    pgDatabase = `oscillab_bench_${crypto.randomBytes(5).toString('hex')}`;
    psql(`CREATE DATABASE ${pgDatabase}`);
    const u = new URL(pgAdmin!);
    u.pathname = `/${pgDatabase}`;
    url = u.toString();
  } else {
    url = `sqlite:${path.join(dir, 'bench.sqlite')}`;
  }
  const env = { ...process.env, DATABASE_URL: url, UPLOAD_DIR: path.join(dir, 'uploads'), OUTBOX_WORKER: 'off' };
  const sequelizeCli = path.resolve('node_modules/sequelize-cli/lib/sequelize');
  execFileSync(process.execPath, [sequelizeCli, 'db:migrate'], { env, stdio: 'pipe' });
  execFileSync(process.execPath, ['--conditions=react-server', '--import', 'tsx', sequelizeCli, 'db:seed:all'], { env, stdio: 'pipe' });

  Object.assign(process.env, { DATABASE_URL: url, UPLOAD_DIR: env.UPLOAD_DIR });
  const { closeDatabase } = await import('@/lib/db');
  await closeDatabase();
  const { models } = await import('@/models');
  const { withoutKeeping, rebuildStatistics, forgetKeptCheck } = await import('@/lib/statistics/keep');
  forgetKeptCheck();
  const { seedSubmissions } = await import('../tests/integration/statistics-seed');
  const { Practical, PracticalCohort, User, CourseMembership, TaAssignment } = models();
  const practical = (await Practical.findOne({ where: { title: 'HCl/DCl fundamental band', copiedFromId: null } }))!;
  const cohortIds = (await PracticalCohort.findAll({ where: { practicalId: practical.id }, order: [['cohortId', 'ASC']] })).map(
    (p) => p.cohortId,
  );
  const t0 = performance.now();
  await withoutKeeping(async () => {
    for (const [ci, cohortId] of cohortIds.entries()) {
      const markers = (await TaAssignment.findAll({ where: { cohortId } })).map((a) => a.taId);
      const count = Math.ceil(size / cohortIds.length);
      for (let start = 0; start < count; start += 2500) {
        const n = Math.min(2500, count - start);
        const students = await User.bulkCreate(
          Array.from({ length: n }, (_, i) => ({
            email: `b${ci}-${start + i}@bench.example`,
            name: `Bench Student ${ci}-${start + i}`,
            passwordHash: null,
            isAdmin: false,
            studentNumber: `HB${ci}${String(start + i).padStart(6, '0')}`,
          })),
        );
        await CourseMembership.bulkCreate(
          students.map((s) => ({ userId: s.id, courseId: practical.courseId, role: 'student' as const, cohortId })),
        );
        await seedSubmissions({
          practicalId: practical.id,
          cohortId,
          studentIds: students.map((s) => s.id),
          markerIds: markers.length ? markers : [students[0].id],
          seed: 1 + ci * 1000 + start,
        });
      }
    }
  });
  const built = await rebuildStatistics();
  // On PostgreSQL a bulk load outruns autovacuum (it looks once a minute): until it has run, the
  // planner guesses row counts and index-only scans visit the table for every row. A running
  // department's database has been vacuumed and analysed since its last big change; so is this one.
  if (POSTGRES) await (await import('@/lib/db')).sequelize().query('VACUUM ANALYZE');
  console.log(
    `  database: ${POSTGRES ? `PostgreSQL ${pgDatabase}` : 'SQLite'}; ${size.toLocaleString('en-GB')} submissions added over ${cohortIds.length} cohorts in ${((performance.now() - t0) / 1000).toFixed(0)} s (kept statistics: ${built.submissions} counted)`,
  );
  await closeDatabase();
  return url;
}

async function mailIds(api: string): Promise<string[]> {
  const res = await fetch(`${api}/api/email`);
  const mails = (await res.json()) as { headers?: Record<string, string> }[];
  return mails.map((m) => m.headers?.['x-oscillab-outbox-id'] ?? '').filter(Boolean);
}

async function runSize(size: number) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-bench-http-'));
  const started: ChildProcess[] = [];
  try {
    console.log(
      `\n=== ${size.toLocaleString('en-GB')} submissions, ${INSTANCES} instance(s) on ${POSTGRES ? 'PostgreSQL' : 'SQLite'} — load ${load()}`,
    );
    const url = await prepareDatabase(size, dir);
    const [smtpPort, webPort, ...appPorts] = await ports(2 + INSTANCES);
    const catcher = spawn(process.execPath, [path.resolve('scripts/maildev.mjs'), String(smtpPort), String(webPort)], {
      stdio: 'ignore',
      detached: true,
    });
    children.push(catcher);
    started.push(catcher);
    const mailApi = `http://127.0.0.1:${webPort}`;
    await waitForHttp(`${mailApi}/api/email`, catcher, 'mail catcher', 30_000);

    const bases = appPorts.map((p) => `http://127.0.0.1:${p}`);
    const servers = bases.map((base, i) => {
      const env: NodeJS.ProcessEnv = {
        ...process.env,
        NODE_ENV: 'production',
        DATABASE_URL: url,
        UPLOAD_DIR: path.join(dir, 'uploads'),
        NEXTAUTH_SECRET: 'bench-http-secret',
        NEXTAUTH_URL: base,
        APP_ORIGIN: base,
        OUTBOX_WORKER: 'on',
        OUTBOX_INTERVAL_MS: '500',
        STORAGE_SWEEP: 'off',
        SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
      };
      const log = fs.openSync(path.join(dir, `server-${i}.log`), 'a');
      const child = spawn(
        process.execPath,
        [...serverNodeArgs, path.resolve('node_modules/next/dist/bin/next'), 'start', '-p', String(appPorts[i]), '-H', '127.0.0.1'],
        { env, stdio: ['ignore', log, log], detached: true },
      );
      children.push(child);
      started.push(child);
      return child;
    });
    await Promise.all(servers.map((s, i) => waitForHttp(`${bases[i]}/api/health`, s, `next start on ${bases[i]}`)));
    const memory = servers.map((s) => watchMemory(s.pid!));

    // Who and what to drive, read from the seeded demo.
    const { models } = await import('@/models');
    const { closeDatabase } = await import('@/lib/db');
    const { emptyDraft } = await import('@/lib/schemas/submission');
    const { Practical, PracticalCohort, CourseMembership, User, TaAssignment, Submission } = models();
    const practical = (await Practical.findOne({ where: { title: 'HCl/DCl fundamental band', copiedFromId: null } }))!;
    const cohortIds = (await PracticalCohort.findAll({ where: { practicalId: practical.id }, order: [['cohortId', 'ASC']] })).map(
      (p) => p.cohortId,
    );
    const demoStudents = (
      await User.findAll({
        where: { email: { [(await import('sequelize')).Op.like]: 'student%@northmere.example' } },
        order: [['id', 'ASC']],
      })
    ).map((u) => u);
    const memberIds = new Set(
      (await CourseMembership.findAll({ where: { courseId: practical.courseId, role: 'student', cohortId: cohortIds } })).map(
        (m) => m.userId,
      ),
    );
    const students = demoStudents
      .filter((u) => memberIds.has(u.id))
      .map((u) => u.email)
      .slice(0, 20);
    const taId = (await TaAssignment.findOne({ where: { cohortId: cohortIds[0], studentId: null }, order: [['id', 'ASC']] }))!.taId;
    const ta = (await User.findByPk(taId))!.email;
    const lead = 'lead@northmere.example';
    const toRelease = (
      await Submission.findAll({
        where: { practicalId: practical.id, cohortId: cohortIds[0], status: 'marked', isMarkedAttempt: true },
        attributes: ['id'],
        limit: RELEASE_BATCH,
        order: [['id', 'ASC']],
      })
    ).map((s) => s.id);
    const queueRows = await Submission.count({
      where: {
        practicalId: practical.id,
        cohortId: cohortIds[0],
        isMarkedAttempt: true,
        status: ['submitted', 'marked', 'released', 'resubmission-requested'],
      },
    });
    const draft = emptyDraft(practical.species);
    const first = practical.species[0];
    draft.species[first].lines = [
      { branch: 'R', J: 0, wavenumber: 2906.25 },
      { branch: 'R', J: 1, wavenumber: 2925.9 },
      { branch: 'P', J: 1, wavenumber: 2865.1 },
      { branch: 'P', J: 2, wavenumber: 2843.6 },
    ] as never;
    draft.species[first].values = { bandCentre: { value: '2885.9', unit: 'cm-1', uncertainty: '0.5' } } as never;
    const draftBody = JSON.stringify({ practicalId: practical.id, draft });
    await closeDatabase();

    console.log(`  next start on ${bases.join(' and ')}; signing in ${students.length} students, ${ta} and ${lead}…`);
    const studentCookies: string[] = [];
    for (const s of students) studentCookies.push(await signIn(bases[0], s));
    const taCookie = await signIn(bases[0], ta);
    const leadCookie = await signIn(bases[bases.length - 1], lead);
    const routes: Record<string, Spec> = {
      bare: { path: '/api/health', cookies: [''] },
      'draft save': { path: '/api/submissions/draft', method: 'PUT', cookies: studentCookies, body: draftBody },
      queue: { path: `/api/marking/queue?practicalId=${practical.id}`, cookies: [taCookie] },
      statistics: { path: `/api/statistics/practicals/${practical.id}?cohortId=${cohortIds[0]}`, cookies: [leadCookie] },
    };
    const only = process.env.BENCH_ROUTES?.split(',').map((r) => r.trim());
    if (only) for (const name of Object.keys(routes)) if (name !== 'bare' && !only.includes(name)) delete routes[name];
    for (const [name, spec] of Object.entries(routes)) {
      for (const base of bases) {
        const res = await fetch(base + spec.path, {
          method: spec.method ?? 'GET',
          headers: { origin: base, cookie: spec.cookies[0], ...(spec.body ? { 'content-type': 'application/json' } : {}) },
          body: spec.body,
        });
        if (!res.ok) throw new Error(`${name} on ${base}: ${res.status} ${await res.text()}`);
      }
      const warm = await drive(bases, name, 10, spec, 1);
      console.log(`  warm-up ${name.padEnd(10)} @10: ${JSON.stringify(warm.statuses)}${warm.errors ? `, ${warm.errors} errors` : ''}`);
    }
    console.log(`  practical ${practical.id}; the TA's queue holds ${queueRows.toLocaleString('en-GB')} submissions; ${SECONDS} s per run`);
    const runs: Run[] = [];
    for (const connections of [20, 100]) {
      for (const [name, spec] of Object.entries(routes)) {
        await settle(bases);
        const r = await drive(bases, name, connections, spec);
        runs.push(r);
        console.log(`  ran ${name.padEnd(10)} @${connections}: ${r.total} requests (load ${load()})`);
      }
    }

    // A release through the app: every e-mail must arrive exactly once, whichever worker sends it.
    await fetch(`${mailApi}/api/email/all`, { method: 'DELETE' });
    const releaseStart = performance.now();
    const released = await fetch(`${bases[0]}/api/release`, {
      method: 'POST',
      headers: { origin: bases[0], cookie: taCookie, 'content-type': 'application/json' },
      body: JSON.stringify({ submissionIds: toRelease }),
    });
    const releaseBody = (await released.json()) as { released?: number; error?: string };
    const releasedIn = performance.now() - releaseStart;
    const deliverEnd = Date.now() + 120_000;
    let ids: string[] = [];
    for (;;) {
      ids = await mailIds(mailApi);
      if (ids.length >= (releaseBody.released ?? 0) || Date.now() > deliverEnd) break;
      await new Promise((r) => setTimeout(r, 500));
    }
    await new Promise((r) => setTimeout(r, 2000)); // a duplicate would arrive now
    ids = await mailIds(mailApi);
    const deliveredIn = performance.now() - releaseStart;
    const distinct = new Set(ids).size;
    const peaks = memory.map((m) => m.stop());

    const logs = bases.map((_, i) => fs.readFileSync(path.join(dir, `server-${i}.log`), 'utf8'));
    const serverErrors = logs.reduce((n, l) => n + l.split('\n').filter((x) => /unhandled error|\[oscillab\].*Error/.test(x)).length, 0);
    if (serverErrors) {
      const keep = path.join(os.tmpdir(), `oscillab-bench-http-server-${Date.now()}.log`);
      fs.writeFileSync(keep, logs.join('\n----\n'));
      console.log(`  server logs with errors kept at ${keep}`);
    }

    const pad = (s: string | number, n: number) => String(s).padStart(n);
    console.log(
      `\n  ${'route'.padEnd(12)}${pad('conn', 5)}${pad('median ms', 11)}${pad('p95 ms', 9)}${pad('req/s', 9)}${pad('errors', 8)}${pad('non-2xx', 9)}${pad('p95/bare', 10)}${pad('µs/subm.', 10)}`,
    );
    for (const r of runs) {
      const bare = runs.find((b) => b.route === 'bare' && b.connections === r.connections)!;
      console.log(
        `  ${r.route.padEnd(12)}${pad(r.connections, 5)}${pad(r.median.toFixed(1), 11)}${pad(r.p95.toFixed(1), 9)}${pad(r.rps.toFixed(0), 9)}${pad(r.errors, 8)}${pad(r.non2xx, 9)}${pad((r.p95 / bare.p95).toFixed(2) + '×', 10)}${pad(((r.p95 * 1000) / size).toFixed(2), 10)}`,
      );
    }
    console.log(`  peak resident memory: ${peaks.map((p, i) => `instance ${i + 1} ${(p / 2 ** 20).toFixed(0)} MB`).join(', ')}`);
    console.log(
      `  release of ${toRelease.length} through POST /api/release: ${releaseBody.released ?? releaseBody.error} released in ${(releasedIn / 1000).toFixed(1)} s, e-mails delivered by ${(deliveredIn / 1000).toFixed(1)} s: ${ids.length} received, ${distinct} distinct outbox rows`,
    );
    console.log(`  500s logged by the servers: ${serverErrors}`);

    const get = (route: string, c: number) => runs.find((r) => r.route === route && r.connections === c);
    const ratio = (route: string, c: number) => (get(route, c)?.p95 ?? NaN) / get('bare', c)!.p95;
    const targets: [string, boolean][] = [];
    if (get('draft save', 20))
      targets.push([`draft save p95 @20 ≤ 3× bare: ${ratio('draft save', 20).toFixed(2)}×`, ratio('draft save', 20) <= 3]);
    if (get('queue', 20))
      targets.push([
        `queue p95 @20 ≤ 3× bare and ≥ 100 req/s: ${ratio('queue', 20).toFixed(2)}×, ${get('queue', 20)!.rps.toFixed(0)} req/s`,
        ratio('queue', 20) <= 3 && get('queue', 20)!.rps >= 100,
      ]);
    if (get('statistics', 20))
      targets.push([`statistics p95 @20 ≤ 3× bare: ${ratio('statistics', 20).toFixed(2)}×`, ratio('statistics', 20) <= 3]);
    for (const route of ['queue', 'statistics'])
      if (get(route, 100)) targets.push([`${route} p95 @100 ≤ 6× bare: ${ratio(route, 100).toFixed(2)}×`, ratio(route, 100) <= 6]);
    const errors = runs.reduce((n, r) => n + r.errors + r.non2xx, 0) + serverErrors;
    targets.push([`no errors (timed runs, all routes; server 500s): ${errors}`, errors === 0]);
    const exactlyOnce = releaseBody.released === toRelease.length && ids.length === toRelease.length && distinct === toRelease.length;
    targets.push([
      `every e-mail of the release exactly once: ${ids.length} received for ${releaseBody.released ?? 0} released, ${distinct} distinct`,
      exactlyOnce,
    ]);
    for (const [text, ok] of targets) console.log(`  target — ${text} → ${ok ? 'met' : 'NOT met'}`);
    return { size, runs, peaks, targets };
  } finally {
    for (const c of started) {
      try {
        if (c.pid) process.kill(-c.pid, 'SIGTERM');
      } catch {}
    }
    await new Promise((r) => setTimeout(r, 1500));
    for (const c of started) {
      try {
        if (c.pid && c.exitCode === null) process.kill(-c.pid, 'SIGKILL');
      } catch {}
    }
    fs.rmSync(dir, { recursive: true, force: true });
    if (pgDatabase) {
      try {
        psql(`DROP DATABASE IF EXISTS ${pgDatabase} WITH (FORCE)`);
      } catch (e) {
        console.error(`could not drop ${pgDatabase}:`, (e as Error).message);
      }
      pgDatabase = null;
    }
  }
}

async function main() {
  if (!fs.existsSync(path.join(distDir, 'BUILD_ID'))) {
    console.error(
      `No production build in ${distDir}/. Run \`${process.env.NEXT_DIST_DIR ? `NEXT_DIST_DIR=${distDir} ` : ''}npm run build\` first.`,
    );
    process.exit(2);
  }
  if (POSTGRES) pgAdmin = execFileSync('bash', ['scripts/postgres.sh'], { encoding: 'utf8' }).trim().split('\n').pop()!;
  console.log(
    `Oscillab HTTP benchmark — ${os.cpus().length} CPUs, load average at start ${load()}; build ${distDir}/; sizes ${SIZES.join(', ')}; ${INSTANCES} instance(s) on ${POSTGRES ? `PostgreSQL (${pgAdmin})` : 'SQLite'}`,
  );
  const results = [];
  for (const size of SIZES) results.push(await runSize(size));
  if (results.length > 1) {
    console.log(`\nAcross sizes (p95 ms @20 / @100, ratio to bare in the same run):`);
    const routes = [...new Set(results.flatMap((r) => r.runs.map((x) => x.route)))];
    console.log(`  ${'route'.padEnd(12)}${results.map((r) => r.size.toLocaleString('en-GB').padStart(26)).join('')}`);
    for (const route of routes) {
      const cells = results.map((r) => {
        const a = r.runs.find((x) => x.route === route && x.connections === 20)!;
        const b = r.runs.find((x) => x.route === route && x.connections === 100)!;
        const ba = r.runs.find((x) => x.route === 'bare' && x.connections === 20)!;
        const bb = r.runs.find((x) => x.route === 'bare' && x.connections === 100)!;
        return `${a.p95.toFixed(0)}/${b.p95.toFixed(0)} (${(a.p95 / ba.p95).toFixed(1)}×/${(b.p95 / bb.p95).toFixed(1)}×)`.padStart(26);
      });
      console.log(`  ${route.padEnd(12)}${cells.join('')}`);
    }
    console.log(
      `  ${'peak RSS MB'.padEnd(12)}${results
        .map((r) =>
          r.peaks
            .map((p) => (p / 2 ** 20).toFixed(0))
            .join(' + ')
            .padStart(26),
        )
        .join('')}`,
    );
    const all = results.flatMap((r) => r.targets.map(([t, ok]) => ({ size: r.size, t, ok })));
    console.log(
      `\n${
        all.filter((x) => !x.ok).length
          ? 'Targets NOT met:\n' +
            all
              .filter((x) => !x.ok)
              .map((x) => `  ${x.size}: ${x.t}`)
              .join('\n')
          : 'Every target met at every size.'
      }`,
    );
  }
  console.log(`load average at end ${load()}`);
}

main().then(
  () => process.exit(0),
  (error) => {
    console.error(error);
    stopChildren();
    process.exit(1);
  },
);
