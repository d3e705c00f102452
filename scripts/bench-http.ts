/**
 * HTTP load benchmark (issue 8, item 9): `npx tsx scripts/bench-http.ts [seconds=5]`.
 *
 * Needs a production build (`npm run build`; with NEXT_DIST_DIR set, that folder is used). It
 * makes a fresh temporary database (migrated and seeded with the Northmere demo), starts
 * `next start` on a free port, signs in as demo users through next-auth's own credentials flow,
 * and drives with autocannon at 20 and 100 connections:
 *   - draft save   PUT /api/submissions/draft (students of the HCl/DCl practical, round robin)
 *   - queue        GET /api/marking/queue (a TA)
 *   - statistics   GET /api/statistics/practicals/<id>?cohortId=… (the course lead)
 *   - bare         GET /api/health (fixed JSON, no database, no session) — the baseline
 * Prints median and p95 latency, throughput and errors per route and concurrency, and each
 * route's p95 as a ratio to the bare route's p95 measured in the same run. Targets: draft save
 * p95 ≤ 3× bare at 20 connections; no errors at 100. The server is always stopped at the end.
 */
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
// eslint-disable-next-line @typescript-eslint/no-require-imports
const autocannon = require('autocannon');

const SECONDS = Number(process.argv[2] ?? 5);
/** Extra node flags for the server, e.g. BENCH_SERVER_NODE_ARGS="--cpu-prof --cpu-prof-dir=/tmp/prof" to profile it. */
const serverNodeArgs = (process.env.BENCH_SERVER_NODE_ARGS ?? '').split(/\s+/).filter(Boolean);
const PASSWORD = 'northmere-demo-26';
const distDir = process.env.NEXT_DIST_DIR || '.next';
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-bench-http-'));
let server: ChildProcess | null = null;
let keepLog: string | null = null;

function stopServer() {
  if (!server || server.exitCode !== null || server.pid === undefined) return;
  try {
    process.kill(-server.pid, 'SIGTERM'); // the whole process group: next start and its workers
  } catch {}
}
process.on('exit', () => {
  stopServer();
  if (server?.pid) {
    try {
      process.kill(-server.pid, 'SIGKILL');
    } catch {}
  }
});
for (const sig of ['SIGINT', 'SIGTERM'] as const) process.on(sig, () => process.exit(130));

async function freePort(): Promise<number> {
  const s = net.createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', () => r()));
  const port = (s.address() as net.AddressInfo).port;
  await new Promise((r) => s.close(r));
  return port;
}

const load = () => os.loadavg().map((x) => x.toFixed(2)).join(' ');

type Run = { route: string; connections: number; median: number; p95: number; rps: number; total: number; errors: number; non2xx: number; statuses: Record<string, number> };

function percentile(sorted: number[], p: number) {
  if (!sorted.length) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1))];
}

async function drive(base: string, route: string, connections: number, spec: { path: string; method?: string; cookies: string[]; body?: string }, seconds = SECONDS): Promise<Run> {
  let i = 0;
  const latencies: number[] = [];
  const statuses: Record<string, number> = {};
  const instance = autocannon({
    url: base,
    connections,
    duration: seconds,
    timeout: 20,
    requests: [
      {
        method: spec.method ?? 'GET',
        path: spec.path,
        setupRequest: (req: { headers?: Record<string, string> }) => {
          const cookie = spec.cookies[i++ % spec.cookies.length];
          req.headers = { ...req.headers, origin: base, ...(cookie ? { cookie } : {}), ...(spec.body ? { 'content-type': 'application/json' } : {}) };
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
  latencies.sort((a, b) => a - b);
  return {
    route,
    connections,
    median: percentile(latencies, 50),
    p95: percentile(latencies, 95),
    rps: latencies.length / seconds,
    total: latencies.length,
    errors: result.errors + result.timeouts,
    non2xx: result.non2xx,
    statuses,
  };
}

/**
 * autocannon stops counting when its time is up, but the server still works through the requests
 * in flight (at 100 connections, seconds of them on the slower routes). Wait until the bare route
 * answers promptly again, so one run's backlog is not timed as the next route's latency.
 */
async function settle(base: string) {
  const end = Date.now() + 60_000;
  let quick = 0;
  while (quick < 3 && Date.now() < end) {
    const t = performance.now();
    await fetch(`${base}/api/health`).then((r) => r.arrayBuffer());
    quick = performance.now() - t < 30 ? quick + 1 : 0;
    await new Promise((r) => setTimeout(r, 100));
  }
}

function setCookies(res: Response): string[] {
  return (res.headers as unknown as { getSetCookie?: () => string[] }).getSetCookie?.() ?? [];
}

/** Sign in through next-auth's csrf + credentials callback, as the sign-in page does; returns the session cookie. */
async function signIn(base: string, email: string): Promise<string> {
  const csrfRes = await fetch(`${base}/api/auth/csrf`);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const jar = setCookies(csrfRes).map((c) => c.split(';')[0]).join('; ');
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: jar, origin: base },
    body: new URLSearchParams({ csrfToken, email, password: PASSWORD, json: 'true' }),
  });
  const session = setCookies(res).map((c) => c.split(';')[0]).find((c) => /session-token=/.test(c));
  if (!session) throw new Error(`sign-in failed for ${email}: ${res.status}`);
  return session;
}

async function main() {
  if (!fs.existsSync(path.join(distDir, 'BUILD_ID'))) {
    console.error(`No production build in ${distDir}/. Run \`${process.env.NEXT_DIST_DIR ? `NEXT_DIST_DIR=${distDir} ` : ''}npm run build\` first.`);
    process.exit(2);
  }
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: 'production',
    DATABASE_URL: `sqlite:${path.join(dir, 'bench.sqlite')}`,
    UPLOAD_DIR: path.join(dir, 'uploads'),
    NEXTAUTH_SECRET: 'bench-http-secret',
    NEXTAUTH_URL: base,
    OUTBOX_WORKER: 'off',
    SMTP_URL: 'smtp://127.0.0.1:9', // no mail is sent by these routes
  };
  Object.assign(process.env, { DATABASE_URL: env.DATABASE_URL!, UPLOAD_DIR: env.UPLOAD_DIR! });
  console.log(`Oscillab HTTP benchmark — ${os.cpus().length} CPUs, load average at start ${load()}`);
  console.log(`build ${distDir}/, database ${env.DATABASE_URL}`);
  const sequelizeCli = path.resolve('node_modules/sequelize-cli/lib/sequelize');
  execFileSync(process.execPath, [sequelizeCli, 'db:migrate'], { env, stdio: 'pipe' });
  execFileSync(process.execPath, ['--import', 'tsx', sequelizeCli, 'db:seed:all'], { env, stdio: 'pipe' });

  // Who and what to drive, read from the seeded demo.
  const { models } = await import('@/models');
  const { closeDatabase } = await import('@/lib/db');
  const { emptyDraft } = await import('@/lib/schemas/submission');
  const { Practical, PracticalCohort, CourseMembership, User, TaAssignment, Course } = models();
  const practical = (await Practical.findOne({ where: { title: 'HCl/DCl fundamental band' } }))!;
  const placements = await PracticalCohort.findAll({ where: { practicalId: practical.id } });
  const cohortIds = placements.map((p) => p.cohortId);
  const studentIds = (await CourseMembership.findAll({ where: { courseId: practical.courseId, role: 'student', cohortId: cohortIds } })).map((m) => m.userId);
  const students = (await User.findAll({ where: { id: studentIds }, order: [['id', 'ASC']] })).map((u) => u.email).slice(0, 20);
  const taId = (await TaAssignment.findOne({ where: { cohortId: cohortIds[0] } }))!.taId;
  const ta = (await User.findByPk(taId))!.email;
  const course = (await Course.findByPk(practical.courseId))!;
  const lead = 'lead@northmere.example';
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

  const log = fs.openSync(path.join(dir, 'server.log'), 'a');
  server = spawn(process.execPath, [...serverNodeArgs, path.resolve('node_modules/next/dist/bin/next'), 'start', '-p', String(port), '-H', '127.0.0.1'], { env, stdio: ['ignore', log, log], detached: true });
  try {
    const end = Date.now() + 90_000;
    for (;;) {
      try {
        if ((await fetch(`${base}/api/health`)).ok) break;
      } catch {}
      if (server.exitCode !== null) throw new Error(`next start exited (${server.exitCode}); see ${dir}/server.log`);
      if (Date.now() > end) throw new Error('next start did not answer within 90 s');
      await new Promise((r) => setTimeout(r, 300));
    }
    console.log(`next start on ${base} (pid ${server.pid}); signing in ${students.length} students, ${ta} and ${lead}…`);
    const studentCookies: string[] = [];
    for (const s of students) studentCookies.push(await signIn(base, s));
    const taCookie = await signIn(base, ta);
    const leadCookie = await signIn(base, lead);

    type Spec = { path: string; method?: string; cookies: string[]; body?: string };
    const routes: Record<string, Spec> = {
      bare: { path: '/api/health', cookies: [''] },
      'draft save': { path: '/api/submissions/draft', method: 'PUT', cookies: studentCookies, body: draftBody },
      queue: { path: `/api/marking/queue?practicalId=${practical.id}`, cookies: [taCookie] },
      statistics: { path: `/api/statistics/practicals/${practical.id}?cohortId=${cohortIds[0]}`, cookies: [leadCookie] },
    };
    // BENCH_ROUTES="bare,draft save" drives only those (e.g. to profile one route); bare is always kept for the ratio.
    const only = process.env.BENCH_ROUTES?.split(',').map((r) => r.trim());
    if (only) for (const name of Object.keys(routes)) if (name !== 'bare' && !only.includes(name)) delete routes[name];
    // Each route answers correctly once before it is timed.
    for (const [name, spec] of Object.entries(routes)) {
      const res = await fetch(base + spec.path, { method: spec.method ?? 'GET', headers: { origin: base, cookie: spec.cookies[0], ...(spec.body ? { 'content-type': 'application/json' } : {}) }, body: spec.body });
      if (!res.ok) throw new Error(`${name}: ${res.status} ${await res.text()}`);
    }
    for (const [name, spec] of Object.entries(routes)) {
      const warm = await drive(base, name, 10, spec, 1);
      console.log(`  warm-up ${name.padEnd(10)} @10: ${JSON.stringify(warm.statuses)}${warm.errors ? `, ${warm.errors} errors` : ''}`);
    }

    console.log(`course ${course.code}, practical ${practical.id} (${practical.species.join(', ')}), ${SECONDS} s per run\n`);
    const runs: Run[] = [];
    for (const connections of [20, 100]) {
      for (const [name, spec] of Object.entries(routes)) {
        await settle(base);
        const r = await drive(base, name, connections, spec);
        runs.push(r);
        console.log(`  ran ${name.padEnd(10)} @${connections}: ${r.total} requests (load ${load()})`);
      }
    }

    const pad = (s: string | number, n: number) => String(s).padStart(n);
    console.log(`\n${'route'.padEnd(12)}${pad('conn', 5)}${pad('median ms', 11)}${pad('p95 ms', 9)}${pad('req/s', 9)}${pad('errors', 8)}${pad('non-2xx', 9)}${pad('p95/bare', 10)}`);
    for (const r of runs) {
      const bare = runs.find((b) => b.route === 'bare' && b.connections === r.connections)!;
      console.log(`${r.route.padEnd(12)}${pad(r.connections, 5)}${pad(r.median.toFixed(1), 11)}${pad(r.p95.toFixed(1), 9)}${pad(r.rps.toFixed(0), 9)}${pad(r.errors, 8)}${pad(r.non2xx, 9)}${pad((r.p95 / bare.p95).toFixed(2) + '×', 10)}`);
    }
    const draft20 = runs.find((r) => r.route === 'draft save' && r.connections === 20) ?? { p95: NaN };
    const bare20 = runs.find((r) => r.route === 'bare' && r.connections === 20)!;
    const at100 = runs.filter((r) => r.connections === 100);
    const ratio = draft20.p95 / bare20.p95;
    const errors100 = at100.reduce((n, r) => n + r.errors + r.non2xx, 0);
    const starved = at100.filter((r) => r.total < 10).map((r) => r.route);
    const serverLog = fs.readFileSync(path.join(dir, 'server.log'), 'utf8');
    const serverErrors = serverLog.split('\n').filter((l) => /unhandled error/.test(l)).length;
    if (serverErrors) {
      keepLog = path.join(os.tmpdir(), `oscillab-bench-http-server-${Date.now()}.log`);
      fs.writeFileSync(keepLog, serverLog);
    }
    console.log(`\nstatus codes: ${runs.map((r) => `${r.route}@${r.connections} ${JSON.stringify(r.statuses)}`).join('; ')}`);
    console.log(`500s logged by the server (timed runs and warm-up): ${serverErrors}${keepLog ? ` — log kept at ${keepLog}` : ''}`);
    console.log(`target 1 — draft save p95 at 20 connections ≤ 3× bare: ${ratio.toFixed(2)}× → ${ratio <= 3 ? 'met' : 'NOT met'}`);
    console.log(
      `target 2 — no errors at 100 connections: ${errors100} errors/non-2xx → ${errors100 === 0 && !starved.length ? 'met' : 'NOT met'}` +
        (starved.length ? ` (too few answers within the run for ${starved.join(', ')}: run longer)` : ''),
    );
    console.log(`load average at end ${load()}`);
  } finally {
    stopServer();
    await new Promise((r) => setTimeout(r, 1500));
    if (server?.pid && server.exitCode === null) {
      try {
        process.kill(-server.pid, 'SIGKILL');
      } catch {}
    }
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

main().then(
  () => process.exit(0),
  (error) => {
    console.error(error);
    stopServer();
    process.exit(1);
  },
);
