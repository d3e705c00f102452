/**
 * Benchmark of the statistics API at growing size: `npm run bench:stats -- [iterations=40]`
 * with BENCH_SIZES=1000,10000,100000 (the default) — counted submissions in one practical, over
 * 20 cohorts (8 check results and 5 marks each, a third with a superseded earlier attempt).
 *
 * Per size, in a temporary SQLite database built by the real migrations: seeds (statistics-seed.ts,
 * with the hooks' upkeep off) and rebuilds the kept statistics from scratch (timed: the cost of
 * `npm run stats:rebuild`), checks that the kept figures equal the plain-SQL recomputation, then
 * times, alternating so a change of machine load hits both alike:
 *   - the route handler GET /api/statistics/practicals/:id (imported, signed in as the course
 *     lead), uncached (STATS_CACHE=off), for the whole practical and for one cohort;
 *   - the reference: one plain GROUP BY over the check results of the practical (what the issue
 *     compares with), and the handler's own statements run on a plain sqlite3 connection (the app's
 *     overhead over its own SQL);
 *   - the cached handler, the statistics as recomputed by plain SQL before they were kept (a few
 *     runs), and the upkeep of one change (a mark changed through the model: its transaction with
 *     the kept statistics brought up to date).
 * Prints median and p95, per-item cost (µs per submission) and the targets: uncached p95 < 300 ms
 * and ≤ 1.5× the plain GROUP BY, at every size. BENCH_STATEMENTS=1 also prints each statement's
 * own time; BENCH_DB=/dir keeps the databases (and reuses them on the next run).
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';

process.env.NEXTAUTH_SECRET ||= 'bench-secret';
process.env.OUTBOX_WORKER = 'off';
// The statistics route logs a line per request (lib/log.ts); only warnings and errors here, unless asked.
process.env.LOG_LEVEL ??= 'warn';

const N = Number(process.argv[2] ?? 40);
const SIZES = (process.env.BENCH_SIZES ?? '1000,10000,100000')
  .split(',')
  .map((s) => Number(s.trim()))
  .filter((n) => n > 0);
const COHORTS = 20;
const keepDir = process.env.BENCH_DB;

type Timing = { label: string; median: number; p95: number };

function percentile(sorted: number[], p: number) {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  return sorted[lo] + (h - lo) * ((sorted[Math.min(lo + 1, sorted.length - 1)] ?? sorted[lo]) - sorted[lo]);
}

function report(label: string, t: number[], size?: number): Timing {
  t.sort((x, y) => x - y);
  const r = { label, median: percentile(t, 0.5), p95: percentile(t, 0.95) };
  const per = size ? `   ${((r.median * 1000) / size).toFixed(2).padStart(8)} µs/submission` : '';
  console.log(`  ${label.padEnd(58)} median ${r.median.toFixed(1).padStart(8)} ms   p95 ${r.p95.toFixed(1).padStart(8)} ms${per}`);
  return r;
}

/** Measurements alternated iteration by iteration, so drifting load affects all alike. */
async function timeTogether(n: number, items: [string, () => Promise<unknown>, number?][]): Promise<Timing[]> {
  for (const [, fn] of items) await fn(); // warm-up
  const times = items.map(() => [] as number[]);
  for (let i = 0; i < n; i++) {
    for (const [k, [, fn]] of items.entries()) {
      const start = performance.now();
      await fn();
      times[k].push(performance.now() - start);
    }
  }
  return items.map(([label, , size], k) => report(label, times[k], size));
}

const load = () =>
  os
    .loadavg()
    .map((l) => l.toFixed(2))
    .join(' ');

async function seed(size: number) {
  const { models } = await import('@/models');
  const { createPractical, seedSubmissions } = await import('../tests/integration/statistics-seed');
  const { withoutKeeping, rebuildStatistics } = await import('@/lib/statistics/keep');
  const { User, Course, Cohort, CourseMembership, TaAssignment } = models();
  const perCohort = Math.ceil(size / COHORTS);
  const seedStart = performance.now();
  await withoutKeeping(async () => {
    const course = await Course.create({ code: 'BENCH1', title: 'Benchmark course', archivedAt: null });
    const lead = await User.create({
      email: 'lead@bench.example',
      name: 'Bench Lead',
      passwordHash: null,
      isAdmin: false,
      studentNumber: null,
    });
    await CourseMembership.create({ userId: lead.id, courseId: course.id, role: 'lead', cohortId: null });
    const tas = await User.bulkCreate(
      Array.from({ length: 10 }, (_, i) => ({
        email: `ta${i}@bench.example`,
        name: `Bench TA ${i}`,
        passwordHash: null,
        isAdmin: false,
        studentNumber: null,
      })),
    );
    const cohorts = await Cohort.bulkCreate(
      Array.from({ length: COHORTS }, (_, i) => ({
        courseId: course.id,
        name: `Group ${i + 1}`,
        term: i < 10 ? '2025 Autumn' : '2026 Autumn',
        instrument: `Bench ${(i % 3) + 1}`,
        archivedAt: null,
      })),
    );
    const practical = await createPractical(
      course.id,
      cohorts.map((c) => c.id),
    );
    for (const [ci, cohort] of cohorts.entries()) {
      for (let start = 0; start < perCohort; start += 2500) {
        const count = Math.min(2500, perCohort - start);
        const students = await User.bulkCreate(
          Array.from({ length: count }, (_, i) => ({
            email: `s${ci}-${start + i}@bench.example`,
            name: `Student ${ci}-${start + i}`,
            passwordHash: null,
            isAdmin: false,
            studentNumber: `B${ci}${String(start + i).padStart(6, '0')}`,
          })),
        );
        await CourseMembership.bulkCreate(
          students.map((s) => ({ userId: s.id, courseId: course.id, role: 'student' as const, cohortId: cohort.id })),
        );
        const markers = [tas[ci % 10].id, tas[(ci + 1) % 10].id];
        if (start === 0) await TaAssignment.bulkCreate(markers.map((taId) => ({ cohortId: cohort.id, taId, studentId: null })));
        await seedSubmissions({
          practicalId: practical.id,
          cohortId: cohort.id,
          studentIds: students.map((s) => s.id),
          markerIds: markers,
          moderatorId: lead.id,
          seed: ci + 1 + start,
        });
      }
      process.stdout.write(`\r  seeding: ${ci + 1} of ${COHORTS} cohorts`);
    }
  });
  const seeded = performance.now() - seedStart;
  const rebuildStart = performance.now();
  const built = await rebuildStatistics();
  const rebuilt = performance.now() - rebuildStart;
  process.stdout.write('\r');
  console.log(
    `  seeded in ${(seeded / 1000).toFixed(1)} s; kept statistics rebuilt from scratch in ${(rebuilt / 1000).toFixed(1)} s (${((rebuilt * 1000) / built.submissions).toFixed(0)} µs per counted submission)`,
  );
}

async function runSize(size: number) {
  const dir = keepDir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-bench-stats-'));
  fs.mkdirSync(dir, { recursive: true });
  const dbFile = path.join(dir, `stats-${size}.sqlite`);
  const reuse = fs.existsSync(dbFile) && Boolean(keepDir);
  process.env.DATABASE_URL = `sqlite:${dbFile}`;
  const { closeDatabase, sequelize } = await import('@/lib/db');
  const { forgetKeptCheck } = await import('@/lib/statistics/keep');
  const { clearStatisticsCache } = await import('@/lib/statistics/cache');
  await closeDatabase();
  forgetKeptCheck();
  clearStatisticsCache();
  console.log(
    `\n=== ${size.toLocaleString('en-GB')} counted submissions (${COHORTS} cohorts of ${Math.ceil(size / COHORTS).toLocaleString('en-GB')}) — load ${load()}`,
  );
  if (!reuse) {
    execFileSync(process.execPath, [path.resolve('node_modules/sequelize-cli/lib/sequelize'), 'db:migrate'], {
      env: process.env,
      stdio: 'pipe',
    });
    await seed(size);
  }
  const { models } = await import('@/models');
  const { QueryTypes } = await import('sequelize');
  const { apiRequest, params } = await import('../tests/helpers/session');
  const { GET } = await import('@/app/api/statistics/practicals/[id]/route');
  const kept = await import('@/lib/statistics/queries');
  const fresh = await import('@/lib/statistics/recompute');
  const practical = (await models().Practical.findOne())!;
  const lead = (await models().User.findOne({ where: { email: 'lead@bench.example' } }))!;
  const cohorts = await models().Cohort.findAll({ order: [['id', 'ASC']] });
  const cohortIds = cohorts.map((c) => c.id);
  const one = cohortIds[7];
  const [{ n: checks }] = await sequelize().query<{ n: number }>(`SELECT COUNT(*) AS n FROM check_results`, { type: QueryTypes.SELECT });
  console.log(`  ${Number(checks).toLocaleString('en-GB')} check results in the database; ${N} iterations each`);

  // The kept figures against the plain-SQL recomputation, once, at this size.
  const scope = { practicalIds: [practical.id], cohortIds };
  const [kc, fc, kq, fq] = [
    await kept.submissionCounts(scope),
    await fresh.submissionCounts(scope),
    await kept.quantityStatistics(scope),
    await fresh.quantityStatistics(scope),
  ];
  const close = (a: number | null | undefined, b: number | null | undefined) =>
    a === b || (a != null && b != null && Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(b)));
  const same =
    JSON.stringify(kc) === JSON.stringify(fc) &&
    kq.length === fq.length &&
    kq.every((q, i) => {
      const f = fq[i];
      return (
        q.key === f.key &&
        q.basis === f.basis &&
        q.n === f.n &&
        q.students === f.students &&
        JSON.stringify(q.histogram) === JSON.stringify(f.histogram) &&
        close(q.mean, f.mean) &&
        ['min', 'q1', 'median', 'q3', 'max'].every((k) => close(q.box?.[k as 'min'], f.box?.[k as 'min']))
      );
    });
  console.log(
    `  kept figures equal the plain-SQL recomputation (counts, n, students, histogram, mean, min, quartiles, max): ${same ? 'yes' : 'NO'}`,
  );

  const callHandler = async (cohortId?: number) => {
    const url = `/api/statistics/practicals/${practical.id}${cohortId ? `?cohortId=${cohortId}` : ''}`;
    const res = await GET(await apiRequest(url, { as: lead.id }), params({ id: String(practical.id) }));
    if (res.status !== 200) throw new Error(`handler answered ${res.status}: ${await res.text()}`);
    return res.json();
  };
  const captureSql = async (cohortId?: number) => {
    const captured: string[] = [];
    const options = (sequelize() as unknown as { options: { logging: unknown } }).options;
    const before = options.logging;
    options.logging = (sql: string) => captured.push(sql.replace(/^Executing \([^)]*\): /, ''));
    try {
      await callHandler(cohortId);
    } finally {
      options.logging = before;
    }
    return captured;
  };
  const sqlite3 = (await import('sqlite3')).default;
  const direct = await new Promise<InstanceType<typeof sqlite3.Database>>((resolve, reject) => {
    const db = new sqlite3.Database(dbFile, sqlite3.OPEN_READONLY, (err) => (err ? reject(err) : resolve(db)));
  });
  const all = (sql: string) =>
    new Promise<unknown[]>((resolve, reject) => direct.all(sql, (err, rows) => (err ? reject(err) : resolve(rows))));
  const raw = (statements: string[]) => async () => {
    for (const sql of statements) await all(sql);
  };
  const groupBy = () =>
    all(
      `SELECT cr."key", cr.basis, COUNT(*), AVG(cr."relativeDeviation"), MIN(cr."relativeDeviation"), MAX(cr."relativeDeviation")
     FROM check_results cr JOIN submissions s ON s.id = cr."submissionId" WHERE s."practicalId" = ${practical.id} AND s."isMarkedAttempt" = 1
     GROUP BY cr."key", cr.basis`,
    );

  process.env.STATS_CACHE = 'off';
  const wholeSql = await captureSql();
  const cohortSql = await captureSql(one);
  console.log(`  the handler sends ${wholeSql.length} statements (whole practical), ${cohortSql.length} (one cohort) when not cached`);
  if (process.env.BENCH_STATEMENTS) {
    const timed: { ms: number; sql: string }[] = [];
    for (const sql of wholeSql) {
      await all(sql);
      const t = performance.now();
      for (let i = 0; i < 3; i++) await all(sql);
      timed.push({ ms: (performance.now() - t) / 3, sql });
    }
    for (const { ms, sql } of timed.sort((a, b) => b.ms - a.ms))
      console.log(`  ${ms.toFixed(2).padStart(8)} ms  ${sql.replace(/\s+/g, ' ').slice(0, 200)}`);
  }
  const [hw, hc, ref, rw, rc] = await timeTogether(N, [
    ['handler uncached, whole practical', () => callHandler(), size],
    ['handler uncached, one cohort', () => callHandler(one), size],
    ['reference: one plain GROUP BY over the check results', groupBy, size],
    ['raw SQL of the handler (sqlite3 direct), whole', raw(wholeSql)],
    ['raw SQL of the handler (sqlite3 direct), cohort', raw(cohortSql)],
  ]);
  process.env.STATS_CACHE = 'on';
  await timeTogether(N, [['handler cached, whole practical', () => callHandler(), size]]);
  const slow = size >= 50000 ? 3 : 8;
  await timeTogether(slow, [
    [
      `before keeping: recomputed by plain SQL, whole practical (${slow} runs)`,
      async () => {
        await fresh.submissionCounts(scope);
        await fresh.quantityStatistics(scope);
        await fresh.frequentSlips(scope);
        await fresh.markerConsistency(scope, 10);
      },
      size,
    ],
  ]);
  // The write side: one mark changed through the model, its own transaction including the upkeep.
  const { Mark } = models();
  const marks = await Mark.findAll({ where: { itemKey: 'bandCentre:H35Cl' }, limit: N + 2, order: [['id', 'ASC']] });
  let k = 0;
  const [upkeep] = await timeTogether(N, [
    [
      'upkeep of one change (mark saved, kept statistics updated)',
      async () => {
        const m = marks[k++ % marks.length];
        await m.update({ awarded: m.awarded === 1 ? 1.5 : 1 });
      },
    ],
  ]);
  const wholeRatio = hw.p95 / ref.p95;
  const ok = hw.p95 < 300 && hc.p95 < 300 && wholeRatio <= 1.5;
  console.log(
    `  app over its own SQL (median): whole ${(hw.median / rw.median).toFixed(2)}×, cohort ${(hc.median / rc.median).toFixed(2)}×`,
  );
  console.log(
    `  target — uncached p95 < 300 ms and ≤ 1.5× the plain GROUP BY: whole ${hw.p95.toFixed(1)} ms (${wholeRatio.toFixed(2)}×), cohort ${hc.p95.toFixed(1)} ms → ${ok ? 'met' : 'NOT met'}`,
  );
  await new Promise((resolve) => direct.close(resolve));
  await closeDatabase();
  if (!keepDir) fs.rmSync(dir, { recursive: true, force: true });
  return { size, whole: hw, cohort: hc, ref, upkeep, ok, same };
}

async function main() {
  console.log(`Oscillab statistics benchmark — ${os.cpus().length} CPUs, load average ${load()}, sizes ${SIZES.join(', ')}`);
  const results = [];
  for (const size of SIZES) results.push(await runSize(size));
  console.log(
    `\n${'submissions'.padStart(12)} ${'whole p95 ms'.padStart(13)} ${'µs/subm.'.padStart(9)} ${'cohort p95'.padStart(11)} ${'GROUP BY p95'.padStart(13)} ${'ratio'.padStart(7)} ${'upkeep med.'.padStart(12)} ${'equal'.padStart(6)}  target`,
  );
  for (const r of results) {
    console.log(
      `${r.size.toLocaleString('en-GB').padStart(12)} ${r.whole.p95.toFixed(1).padStart(13)} ${((r.whole.median * 1000) / r.size).toFixed(2).padStart(9)} ${r.cohort.p95.toFixed(1).padStart(11)} ${r.ref.p95.toFixed(1).padStart(13)} ${(r.whole.p95 / r.ref.p95).toFixed(2).padStart(6)}× ${r.upkeep.median.toFixed(1).padStart(9)} ms ${(r.same ? 'yes' : 'NO').padStart(6)}  ${r.ok ? 'met' : 'NOT met'}`,
    );
  }
  console.log(`load average at end ${load()}`);
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
