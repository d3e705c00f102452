/**
 * Benchmark of the statistics API: `npx tsx scripts/bench-stats.ts [iterations]`.
 *
 * Seeds 10,000 submissions over 20 cohorts (8 check results and 5 marks each) in a temporary
 * SQLite database built by the real migrations, then calls the route handler
 * GET /api/statistics/practicals/:id (imported, with a signed-in request as the course lead) N
 * times, and in the same run the raw SQL baseline: every statement that handler call sends to the
 * database (captured through Sequelize's logging from one call, with the values inlined), run one
 * after the other on a separate plain sqlite3 connection — no Sequelize, no authorisation, no JS
 * reshaping, no JSON. The ratio handler / raw is therefore the overhead of the app over its own SQL.
 * Handler and raw runs alternate, so a change of machine load hits both alike; the load average is
 * printed. Prints median and p95 of both and their ratio. Target: handler ≤ 3× raw, p95 < 300 ms.
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';

// BENCH_DB=/path/file.sqlite keeps (and on a second run reuses) the seeded database;
// BENCH_STATEMENTS=1 also prints each statement's own time, slowest first.
const keep = process.env.BENCH_DB;
const dir = keep ? path.dirname(keep) : fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-bench-'));
const dbFile = keep ?? path.join(dir, 'bench.sqlite');
const reuse = Boolean(keep && fs.existsSync(keep));
process.env.DATABASE_URL = `sqlite:${dbFile}`;
process.env.NEXTAUTH_SECRET ||= 'bench-secret';
process.env.OUTBOX_WORKER = 'off';

const N = Number(process.argv[2] ?? 40);
const COHORTS = 20;
const PER_COHORT = 500;

function percentile(sorted: number[], p: number) {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  return sorted[lo] + (h - lo) * ((sorted[Math.min(lo + 1, sorted.length - 1)] ?? sorted[lo]) - sorted[lo]);
}

async function time(label: string, fn: () => Promise<unknown>) {
  for (let i = 0; i < 3; i++) await fn(); // warm-up
  const t: number[] = [];
  for (let i = 0; i < N; i++) {
    const start = performance.now();
    await fn();
    t.push(performance.now() - start);
  }
  return report(label, t);
}

/** Two measurements alternated iteration by iteration, so drifting load affects both alike. */
async function timePair(a: [string, () => Promise<unknown>], b: [string, () => Promise<unknown>]) {
  for (let i = 0; i < 3; i++) { await a[1](); await b[1](); } // warm-up
  const ta: number[] = [];
  const tb: number[] = [];
  for (let i = 0; i < N; i++) {
    for (const [fn, t] of [[a[1], ta], [b[1], tb]] as const) {
      const start = performance.now();
      await fn();
      t.push(performance.now() - start);
    }
  }
  return [report(a[0], ta), report(b[0], tb)];
}

function report(label: string, t: number[]) {
  t.sort((x, y) => x - y);
  const r = { label, median: percentile(t, 0.5), p95: percentile(t, 0.95) };
  console.log(`${label.padEnd(50)} median ${r.median.toFixed(1).padStart(7)} ms   p95 ${r.p95.toFixed(1).padStart(7)} ms`);
  return r;
}

async function main() {
  execFileSync(process.execPath, [path.resolve('node_modules/sequelize-cli/lib/sequelize'), 'db:migrate'], { env: process.env, stdio: 'pipe' });
  const { models } = await import('@/models');
  const { closeDatabase, sequelize } = await import('@/lib/db');
  const { QueryTypes } = await import('sequelize');
  const { createPractical, seedSubmissions } = await import('../tests/integration/statistics-seed');
  const { apiRequest, params } = await import('../tests/helpers/session');
  const { GET } = await import('@/app/api/statistics/practicals/[id]/route');
  const q = await import('@/lib/statistics/queries');

  const { User, Course, Cohort, CourseMembership, TaAssignment, Practical } = models();
  const seedStart = performance.now();
  if (reuse) return measure((await Practical.findOne())!.id, (await User.findOne({ where: { email: 'lead@bench.example' } }))!.id);
  const course = await Course.create({ code: 'BENCH1', title: 'Benchmark course', archivedAt: null });
  const lead = await User.create({ email: 'lead@bench.example', name: 'Bench Lead', passwordHash: null, isAdmin: false, studentNumber: null });
  await CourseMembership.create({ userId: lead.id, courseId: course.id, role: 'lead', cohortId: null });
  const tas = await User.bulkCreate(Array.from({ length: 10 }, (_, i) => ({ email: `ta${i}@bench.example`, name: `Bench TA ${i}`, passwordHash: null, isAdmin: false, studentNumber: null })));
  const cohorts = await Cohort.bulkCreate(Array.from({ length: COHORTS }, (_, i) => ({ courseId: course.id, name: `Group ${i + 1}`, term: i < 10 ? '2025 Autumn' : '2026 Autumn', instrument: `Bench ${(i % 3) + 1}`, archivedAt: null })));
  const practical = await createPractical(course.id, cohorts.map((c) => c.id));
  for (const [ci, cohort] of cohorts.entries()) {
    const students = await User.bulkCreate(Array.from({ length: PER_COHORT }, (_, i) => ({ email: `s${ci}-${i}@bench.example`, name: `Student ${ci}-${i}`, passwordHash: null, isAdmin: false, studentNumber: `B${ci}${String(i).padStart(4, '0')}` })));
    await CourseMembership.bulkCreate(students.map((s) => ({ userId: s.id, courseId: course.id, role: 'student' as const, cohortId: cohort.id })));
    const markers = [tas[ci % 10].id, tas[(ci + 1) % 10].id];
    await TaAssignment.bulkCreate(markers.map((taId) => ({ cohortId: cohort.id, taId, studentId: null })));
    await seedSubmissions({ practicalId: practical.id, cohortId: cohort.id, studentIds: students.map((s) => s.id), markerIds: markers, moderatorId: lead.id, seed: ci + 1 });
  }
  await measure(practical.id, lead.id, seedStart);
}

async function measure(practicalId: number, leadId: number, seedStart = performance.now()) {
  const { models } = await import('@/models');
  const { closeDatabase, sequelize } = await import('@/lib/db');
  const { QueryTypes } = await import('sequelize');
  const { apiRequest, params } = await import('../tests/helpers/session');
  const { GET } = await import('@/app/api/statistics/practicals/[id]/route');
  const q = await import('@/lib/statistics/queries');
  const practical = { id: practicalId };
  const lead = { id: leadId };
  const cohorts = await models().Cohort.findAll({ order: [['id', 'ASC']] });
  const [{ n: submissions }] = await sequelize().query<{ n: number }>(`SELECT COUNT(*) AS n FROM submissions WHERE "isMarkedAttempt" = :yes`, { replacements: { yes: true }, type: QueryTypes.SELECT });
  const [{ n: checks }] = await sequelize().query<{ n: number }>(`SELECT COUNT(*) AS n FROM check_results`, { type: QueryTypes.SELECT });
  console.log(`Seeded ${submissions} counted submissions (+ superseded attempts), ${checks} check results, ${COHORTS} cohorts in ${((performance.now() - seedStart) / 1000).toFixed(1)} s; ${N} iterations each.\n`);

  const cohortIds = cohorts.map((c) => c.id);
  const callHandler = async (cohortId?: number) => {
    const url = `/api/statistics/practicals/${practical.id}${cohortId ? `?cohortId=${cohortId}` : ''}`;
    const res = await GET(await apiRequest(url, { as: lead.id }), params({ id: String(practical.id) }));
    if (res.status !== 200) throw new Error(`handler answered ${res.status}: ${await res.text()}`);
    return res.json();
  };

  // Capture the SQL of one handler call, with values inlined as Sequelize sends them.
  const captureSql = async (cohortId?: number) => {
    const captured: string[] = [];
    const options = (sequelize() as unknown as { options: { logging: unknown } }).options;
    const before = options.logging;
    options.logging = (sql: string) => captured.push(sql.replace(/^Executing \([^)]*\): /, ''));
    try { await callHandler(cohortId); } finally { options.logging = before; }
    return captured;
  };
  const sqlite3 = (await import('sqlite3')).default;
  const direct = await new Promise<InstanceType<typeof sqlite3.Database>>((resolve, reject) => {
    const db = new sqlite3.Database(dbFile, sqlite3.OPEN_READONLY, (err) => (err ? reject(err) : resolve(db)));
  });
  const all = (sql: string) => new Promise<unknown[]>((resolve, reject) => direct.all(sql, (err, rows) => (err ? reject(err) : resolve(rows))));
  const raw = (statements: string[]) => async () => { for (const sql of statements) await all(sql); };

  const load = () => os.loadavg().map((l) => l.toFixed(2)).join(' ');
  console.log(`Load average (1, 5, 15 min) at start: ${load()} on ${os.cpus().length} CPUs`);
  // The raw baseline is the SQL of an uncached call: the aggregates themselves.
  process.env.STATS_CACHE = 'off';
  const wholeSql = await captureSql();
  const cohortSql = await captureSql(cohortIds[7]);
  console.log(`The handler sends ${wholeSql.length} statements (whole practical), ${cohortSql.length} (one cohort) when not cached.\n`);
  if (process.env.BENCH_STATEMENTS) {
    // BENCH_STATEMENTS=1 prints each statement's own time (whole practical), slowest first, to find what to index or rewrite.
    const timed: { ms: number; sql: string }[] = [];
    for (const sql of wholeSql) {
      await all(sql);
      const t = performance.now();
      for (let i = 0; i < 3; i++) await all(sql);
      timed.push({ ms: (performance.now() - t) / 3, sql });
    }
    for (const { ms, sql } of timed.sort((a, b) => b.ms - a.ms)) console.log(`${ms.toFixed(1).padStart(8)} ms  ${sql.replace(/\s+/g, ' ').slice(0, 220)}`);
    console.log('');
  }
  console.log('Uncached (STATS_CACHE=off: every call runs every aggregate):');
  const [hw, rw] = await timePair(['handler, whole practical (10,000 submissions)', () => callHandler()], ['raw SQL (same statements, sqlite3 direct), whole', raw(wholeSql)]);
  const [hc, rc] = await timePair(['handler, one cohort (500 submissions)', () => callHandler(cohortIds[7])], ['raw SQL (same statements, sqlite3 direct), cohort', raw(cohortSql)]);
  process.env.STATS_CACHE = 'on';
  console.log('\nCached (lib/statistics/cache.ts: a change-stamp query per call, aggregates only after a change):');
  const [cw, rw2] = await timePair(['handler cached, whole practical', () => callHandler()], ['raw SQL (uncached statements), whole', raw(wholeSql)]);
  const [cc, rc2] = await timePair(['handler cached, one cohort', () => callHandler(cohortIds[7])], ['raw SQL (uncached statements), cohort', raw(cohortSql)]);
  await time('reference: one plain GROUP BY over check_results', () => sequelize().query(
    `SELECT cr."key", cr.basis, COUNT(*), AVG(cr."relativeDeviation"), MIN(cr."relativeDeviation"), MAX(cr."relativeDeviation")
     FROM check_results cr JOIN submissions s ON s.id = cr."submissionId" WHERE s."practicalId" = :p AND s."isMarkedAttempt" = :yes
     GROUP BY cr."key", cr.basis`, { replacements: { p: practical.id, yes: true }, type: QueryTypes.SELECT }));
  console.log(`Load average (1, 5, 15 min) at end:   ${load()}`);

  const verdict = (name: string, w: { median: number; p95: number }, rW: { median: number; p95: number }, c: { median: number; p95: number }, rC: { median: number; p95: number }) => {
    console.log(`\n${name}: ratio handler / raw (median) whole practical ${(w.median / rW.median).toFixed(2)}×, one cohort ${(c.median / rC.median).toFixed(2)}×;`
      + ` (p95) whole ${(w.p95 / rW.p95).toFixed(2)}×, cohort ${(c.p95 / rC.p95).toFixed(2)}×`);
    const ok = w.median / rW.median <= 3 && c.median / rC.median <= 3 && w.p95 < 300 && c.p95 < 300;
    console.log(ok ? `${name}: target met (≤ 3× raw and p95 < 300 ms).` : `${name}: target NOT met (≤ 3× raw and p95 < 300 ms).`);
  };
  verdict('Uncached', hw, rw, hc, rc);
  verdict('Cached', cw, rw2, cc, rc2);
  if (process.env.BENCH_PROFILE) {
    const one = { practicalIds: [practical.id], cohortIds };
    await time('  counts', () => q.submissionCounts(one));
    await time('  quantities', () => q.quantityStatistics(one));
    await time('  slips', () => q.frequentSlips(one));
    await time('  markers', () => q.markerConsistency(one, 10));
  }
  await new Promise((resolve) => direct.close(resolve));
  await closeDatabase();
  if (!keep) fs.rmSync(dir, { recursive: true, force: true });
}

main().catch((e) => {
  console.error(e);
  if (!keep) fs.rmSync(dir, { recursive: true, force: true });
  process.exit(1);
});
