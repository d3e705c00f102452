/**
 * Benchmark of the statistics API: `npx tsx scripts/bench-stats.ts [iterations]`.
 *
 * Seeds 10,000 submissions over 20 cohorts (8 check results and 5 marks each) in a temporary
 * SQLite database built by the real migrations, then calls the route handler
 * GET /api/statistics/practicals/:id (imported, with a signed-in request as the course lead) N
 * times, and in the same run the raw SQL aggregates it issues, directly on the database. Prints
 * median and p95 latency of both and their ratio. Target: handler ≤ 3× raw, p95 < 300 ms.
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';

// BENCH_DB=/path/file.sqlite keeps (and on a second run reuses) the seeded database.
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
  t.sort((a, b) => a - b);
  const r = { label, median: percentile(t, 0.5), p95: percentile(t, 0.95) };
  console.log(`${label.padEnd(48)} median ${r.median.toFixed(1).padStart(7)} ms   p95 ${r.p95.toFixed(1).padStart(7)} ms`);
  return r;
}

async function main() {
  if (!reuse) execFileSync(process.execPath, [path.resolve('node_modules/sequelize-cli/lib/sequelize'), 'db:migrate'], { env: process.env, stdio: 'pipe' });
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
  const raw = (scope: { practicalIds: number[]; cohortIds: number[] }) => Promise.all([
    q.submissionCounts(scope), q.quantityStatistics(scope), q.frequentSlips(scope), q.markerConsistency(scope, 10),
  ]);

  const results = [];
  results.push(await time('handler, whole practical (10,000 submissions)', () => callHandler()));
  results.push(await time('raw SQL aggregates, whole practical', () => raw({ practicalIds: [practical.id], cohortIds })));
  results.push(await time('handler, one cohort (500 submissions)', () => callHandler(cohortIds[7])));
  results.push(await time('raw SQL aggregates, one cohort', () => raw({ practicalIds: [practical.id], cohortIds: [cohortIds[7]] })));
  await time('reference: one plain GROUP BY over check_results', () => sequelize().query(
    `SELECT cr."key", cr.basis, COUNT(*), AVG(cr."relativeDeviation"), MIN(cr."relativeDeviation"), MAX(cr."relativeDeviation")
     FROM check_results cr JOIN submissions s ON s.id = cr."submissionId" WHERE s."practicalId" = :p AND s."isMarkedAttempt" = :yes
     GROUP BY cr."key", cr.basis`, { replacements: { p: practical.id, yes: true }, type: QueryTypes.SELECT }));

  const [hw, rw, hc, rc] = results;
  console.log(`\nRatio handler / raw (median): whole practical ${(hw.median / rw.median).toFixed(2)}×, one cohort ${(hc.median / rc.median).toFixed(2)}×`);
  console.log(`Ratio handler / raw (p95):    whole practical ${(hw.p95 / rw.p95).toFixed(2)}×, one cohort ${(hc.p95 / rc.p95).toFixed(2)}×`);
  const ok = hw.median / rw.median <= 3 && hw.p95 < 300 && hc.p95 < 300;
  console.log(ok ? 'Target met: ≤ 3× raw and p95 < 300 ms.' : 'Target NOT met (≤ 3× raw and p95 < 300 ms).');
  if (process.env.BENCH_PROFILE) {
    const one = { practicalIds: [practical.id], cohortIds };
    await time('  counts', () => q.submissionCounts(one));
    await time('  quantities', () => q.quantityStatistics(one));
    await time('  slips', () => q.frequentSlips(one));
    await time('  markers', () => q.markerConsistency(one, 10));
  }
  await closeDatabase();
  if (!keep) fs.rmSync(dir, { recursive: true, force: true });
}

main().catch((e) => {
  console.error(e);
  if (!keep) fs.rmSync(dir, { recursive: true, force: true });
  process.exit(1);
});
