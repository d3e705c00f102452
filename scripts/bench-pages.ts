/**
 * Page benchmark: `npm run bench:pages [-- samples]` (default 30 samples per page).
 *
 * Needs a production build (`npx next build` first; with NEXT_DIST_DIR set, that folder is used):
 * this script builds nothing. It makes a fresh temporary database (migrated and seeded with the
 * Northmere demo), starts `next start` on the first free port of 3550–3599 (BENCH_PORT to choose),
 * signs in as one demo person per role through next-auth's own credentials flow, and requests each
 * main page of each role as that person, one request at a time, pages taken in turn so a change in
 * machine load hits all of them alike. For each page it prints the server's time to the first byte
 * and to the last byte of the whole HTML (streamed parts included) — median and p95 — and the p95
 * as a ratio to a bare page measured in the same run: /not-permitted without a session (the page
 * frame and header with no data read at all).
 *
 * Then, when Debian's Chromium is there (CHROMIUM_PATH, default /usr/bin/chromium; BENCH_BROWSER=0
 * skips it), it loads the marking screen and a statistics page in the browser and times "visually
 * complete": from the start of navigation until the figures a person waits for are on screen (the
 * marking screen: values table, spectrum and fit plot; statistics: box plots, tables and the first
 * histogram).
 *
 * Targets (issue 15): every main page p95 under 300 ms server time; marking and statistics pages
 * visually complete under 1 s. Timings are noisy on a shared machine; read the ratios to the bare
 * page, which are measured in the same run. The server is always stopped at the end.
 */
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';

const SAMPLES = Number(process.argv[2] ?? 30);
const WARMUP = 3;
const PASSWORD = 'northmere-demo-26';
const distDir = process.env.NEXT_DIST_DIR || '.next';
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-bench-pages-'));
let server: ChildProcess | null = null;

function stopServer(signal: NodeJS.Signals = 'SIGTERM') {
  if (!server || server.exitCode !== null || server.pid === undefined) return;
  try {
    process.kill(-server.pid, signal); // the whole process group: next start and its workers
  } catch {}
}
process.on('exit', () => stopServer('SIGKILL'));
for (const sig of ['SIGINT', 'SIGTERM'] as const) process.on(sig, () => process.exit(130));

async function portFree(port: number): Promise<boolean> {
  const s = net.createServer();
  return new Promise((resolve) => {
    s.once('error', () => resolve(false));
    s.listen(port, '127.0.0.1', () => s.close(() => resolve(true)));
  });
}

async function pickPort(): Promise<number> {
  if (process.env.BENCH_PORT) return Number(process.env.BENCH_PORT);
  for (let p = 3550; p <= 3599; p++) if (await portFree(p)) return p;
  throw new Error('No free port in 3550–3599 (set BENCH_PORT).');
}

const load = () =>
  os
    .loadavg()
    .map((x) => x.toFixed(2))
    .join(' ');

function percentile(sorted: number[], p: number) {
  if (!sorted.length) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(p * sorted.length) - 1))];
}

/** One GET: time to the first byte of the body and to its end, and the status. */
function timedGet(url: string, cookie: string): Promise<{ status: number; ttfb: number; total: number; bytes: number; location?: string }> {
  return new Promise((resolve, reject) => {
    const start = performance.now();
    const req = http.get(url, { headers: cookie ? { cookie } : {}, agent: false }, (res) => {
      let ttfb = -1;
      let bytes = 0;
      res.on('data', (chunk: Buffer) => {
        if (ttfb < 0) ttfb = performance.now() - start;
        bytes += chunk.length;
      });
      res.on('end', () => {
        const total = performance.now() - start;
        resolve({ status: res.statusCode ?? 0, ttfb: ttfb < 0 ? total : ttfb, total, bytes, location: res.headers.location });
      });
      res.on('error', reject);
    });
    req.on('error', reject);
    req.setTimeout(30_000, () => req.destroy(new Error(`timeout: ${url}`)));
  });
}

function setCookies(res: Response): string[] {
  return (res.headers as unknown as { getSetCookie?: () => string[] }).getSetCookie?.() ?? [];
}

/** Sign in through next-auth's csrf + credentials callback, as the sign-in page does; returns the session cookie. */
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

type PageSpec = { role: string; name: string; path: string; cookie: string };

async function visuallyComplete(base: string, pages: { name: string; path: string; cookie: string; ready: string[] }[], runs: number) {
  const executablePath = process.env.CHROMIUM_PATH || '/usr/bin/chromium';
  if (process.env.BENCH_BROWSER === '0' || !fs.existsSync(executablePath)) {
    console.log(
      `\n(visually complete: skipped — ${process.env.BENCH_BROWSER === '0' ? 'BENCH_BROWSER=0' : `no browser at ${executablePath}`})`,
    );
    return [];
  }
  const { chromium } = await import('@playwright/test');
  const browser = await chromium.launch({ executablePath, args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking'] });
  const out: { name: string; median: number; worst: number; times: number[] }[] = [];
  try {
    for (const p of pages) {
      const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
      const name = p.cookie.slice(0, p.cookie.indexOf('='));
      await context.addCookies([{ name, value: p.cookie.slice(name.length + 1), url: base }]);
      const page = await context.newPage();
      const times: number[] = [];
      for (let i = 0; i < runs + 1; i++) {
        await page.goto(base + p.path, { waitUntil: 'commit' });
        for (const sel of p.ready) await page.locator(sel).first().waitFor({ state: 'visible', timeout: 30_000 });
        // Time since the navigation started, on the page's own clock.
        const t = Number(await page.evaluate('performance.now()'));
        if (i > 0) times.push(t); // the first load warms the browser's caches
      }
      await context.close();
      times.sort((a, b) => a - b);
      out.push({ name: p.name, median: percentile(times, 0.5), worst: times[times.length - 1], times });
    }
  } finally {
    await browser.close();
  }
  return out;
}

async function main() {
  if (!fs.existsSync(path.join(distDir, 'BUILD_ID'))) {
    console.error(
      `No production build in ${distDir}/. Run \`${process.env.NEXT_DIST_DIR ? `NEXT_DIST_DIR=${distDir} ` : ''}npx next build\` first (this script builds nothing).`,
    );
    process.exit(2);
  }
  const port = await pickPort();
  const base = `http://127.0.0.1:${port}`;
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: 'production',
    DATABASE_URL: `sqlite:${path.join(dir, 'bench.sqlite')}`,
    UPLOAD_DIR: path.join(dir, 'uploads'),
    NEXTAUTH_SECRET: 'bench-pages-secret',
    NEXTAUTH_URL: base,
    OUTBOX_WORKER: 'off',
    STORAGE_SWEEP: 'off',
    SMTP_URL: 'smtp://127.0.0.1:9', // nothing here sends mail
  };
  Object.assign(process.env, { DATABASE_URL: env.DATABASE_URL!, UPLOAD_DIR: env.UPLOAD_DIR! });
  console.log(`Oscillab page benchmark — ${os.cpus().length} CPUs, load average at start ${load()}`);
  console.log(`build ${distDir}/, database ${env.DATABASE_URL}, port ${port}`);
  const sequelizeCli = path.resolve('node_modules/sequelize-cli/lib/sequelize');
  execFileSync(process.execPath, [sequelizeCli, 'db:migrate'], { env, stdio: 'pipe' });
  execFileSync(process.execPath, ['--conditions=react-server', '--import', 'tsx', sequelizeCli, 'db:seed:all'], { env, stdio: 'pipe' });

  // Ids from the seeded demo: the practical students work on, a submission ta1 marks, the course.
  const { models } = await import('@/models');
  const { closeDatabase } = await import('@/lib/db');
  const { Practical, Submission, TaAssignment, User } = models();
  const practical = (await Practical.findOne({ where: { title: 'HCl/DCl fundamental band' }, order: [['id', 'ASC']] }))!;
  const ta1 = (await User.findOne({ where: { email: 'ta1@northmere.example' } }))!;
  const duty = (await TaAssignment.findOne({ where: { taId: ta1.id } }))!;
  const submission = (await Submission.findOne({
    where: { practicalId: practical.id, cohortId: duty.cohortId, isMarkedAttempt: true },
    order: [['id', 'ASC']],
  }))!;
  await closeDatabase();

  const log = fs.openSync(path.join(dir, 'server.log'), 'a');
  server = spawn(process.execPath, [path.resolve('node_modules/next/dist/bin/next'), 'start', '-p', String(port), '-H', '127.0.0.1'], {
    env,
    stdio: ['ignore', log, log],
    detached: true,
  });
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
    const who = {
      student: 'student05@northmere.example',
      ta: 'ta1@northmere.example',
      instructor: 'instructor1@northmere.example',
      lead: 'lead@northmere.example',
      admin: 'admin@northmere.example',
    };
    const cookies: Record<string, string> = {};
    for (const [role, email] of Object.entries(who)) cookies[role] = await signIn(base, email);

    const pages: PageSpec[] = [
      { role: '—', name: 'bare page', path: '/not-permitted', cookie: '' },
      { role: 'student', name: 'My practicals', path: '/student', cookie: cookies.student },
      { role: 'student', name: 'practical + form', path: `/student/practicals/${practical.id}`, cookie: cookies.student },
      { role: 'ta', name: 'marking queue', path: '/marking', cookie: cookies.ta },
      { role: 'ta', name: 'marking screen', path: `/marking/${submission.id}`, cookie: cookies.ta },
      { role: 'instructor', name: 'courses', path: '/courses', cookie: cookies.instructor },
      { role: 'instructor', name: 'course set-up', path: `/courses/${practical.courseId}`, cookie: cookies.instructor },
      {
        role: 'instructor',
        name: 'practical editor',
        path: `/courses/${practical.courseId}/practicals/${practical.id}`,
        cookie: cookies.instructor,
      },
      { role: 'instructor', name: 'moderation', path: '/moderation', cookie: cookies.instructor },
      { role: 'lead', name: 'statistics home', path: '/statistics', cookie: cookies.lead },
      { role: 'lead', name: 'statistics', path: `/statistics/${practical.id}`, cookie: cookies.lead },
      { role: 'admin', name: 'administration', path: '/admin', cookie: cookies.admin },
    ];
    // Each page answers 200 to its person before it is timed (not a redirect to sign-in).
    for (const p of pages) {
      const r = await timedGet(base + p.path, p.cookie);
      if (r.status !== 200) throw new Error(`${p.name} (${p.path}) answered ${r.status}${r.location ? ` → ${r.location}` : ''}`);
    }
    for (let i = 0; i < WARMUP; i++) for (const p of pages) await timedGet(base + p.path, p.cookie);

    console.log(`${SAMPLES} samples per page, one request at a time, pages in turn\n`);
    const samples = new Map<string, { ttfb: number[]; total: number[]; bytes: number }>(
      pages.map((p) => [p.name, { ttfb: [], total: [], bytes: 0 }]),
    );
    for (let i = 0; i < SAMPLES; i++) {
      for (const p of pages) {
        const r = await timedGet(base + p.path, p.cookie);
        const s = samples.get(p.name)!;
        s.ttfb.push(r.ttfb);
        s.total.push(r.total);
        s.bytes = r.bytes;
      }
    }
    const bare = samples.get('bare page')!;
    const bareP95 = percentile(
      [...bare.total].sort((a, b) => a - b),
      0.95,
    );
    const pad = (s: string | number, n: number) => String(s).padStart(n);
    console.log(
      `${'role'.padEnd(11)}${'page'.padEnd(18)}${pad('first byte ms', 15)}${pad('whole page ms', 15)}${pad('p95', 8)}${pad('p95/bare', 10)}${pad('KB', 6)}`,
    );
    console.log(`${''.padEnd(29)}${pad('median', 15)}${pad('median', 15)}`);
    const over: string[] = [];
    for (const p of pages) {
      const s = samples.get(p.name)!;
      const ttfb = [...s.ttfb].sort((a, b) => a - b);
      const total = [...s.total].sort((a, b) => a - b);
      const p95 = percentile(total, 0.95);
      if (p.name !== 'bare page' && p95 > 300) over.push(`${p.name} (${p95.toFixed(0)} ms)`);
      console.log(
        `${p.role.padEnd(11)}${p.name.padEnd(18)}${pad(percentile(ttfb, 0.5).toFixed(1), 15)}${pad(percentile(total, 0.5).toFixed(1), 15)}${pad(p95.toFixed(1), 8)}${pad((p95 / bareP95).toFixed(2) + '×', 10)}${pad((s.bytes / 1024).toFixed(0), 6)}`,
      );
    }
    console.log(
      `\ntarget — every main page p95 under 300 ms server time (whole page): ${over.length ? `NOT met: ${over.join(', ')}` : 'met'}`,
    );

    const visual = await visuallyComplete(
      base,
      [
        {
          name: 'marking screen',
          path: `/marking/${submission.id}`,
          cookie: cookies.ta,
          ready: ['#values-heading', '[data-testid="marking-spectrum"] svg', '[data-testid="fit-plot"] svg'],
        },
        {
          name: 'statistics',
          path: `/statistics/${practical.id}`,
          cookie: cookies.lead,
          ready: ['[data-testid="box-plots"]', '[data-testid="slip-table"], #slips-h', '[data-testid="histogram"]'],
        },
      ],
      Number(process.env.BENCH_BROWSER_RUNS ?? 5),
    );
    if (visual.length) {
      console.log(`\nvisually complete in Chromium at 1440×900 (from the start of navigation until the figures are on screen)`);
      for (const v of visual)
        console.log(
          `  ${v.name.padEnd(16)} median ${v.median.toFixed(0)} ms, slowest ${v.worst.toFixed(0)} ms (${v.times.map((t) => t.toFixed(0)).join(', ')})`,
        );
      const slow = visual.filter((v) => v.median > 1000);
      console.log(
        `target — marking and statistics pages visually complete under 1 s (median): ${slow.length ? `NOT met: ${slow.map((v) => v.name).join(', ')}` : 'met'}`,
      );
    }
    const serverLog = fs.readFileSync(path.join(dir, 'server.log'), 'utf8');
    const errors = serverLog.split('\n').filter((l) => /unhandled error|⨯/.test(l)).length;
    console.log(`\nerrors logged by the server: ${errors}; load average at end ${load()}`);
  } finally {
    stopServer();
    await new Promise((r) => setTimeout(r, 1500));
    stopServer('SIGKILL');
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
