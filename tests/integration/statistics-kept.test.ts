/**
 * The kept statistics (lib/statistics/keep.ts) stay equal to a fresh recomputation through any
 * sequence of changes: random inserts, updates (marks, check results, status, cohort, release),
 * re-checks by checkStoredSubmission, superseded attempts, moderations, deletions, changes inside
 * a committed transaction and inside a rolled-back one. After the sequence:
 *   1. the kept rows equal the rows rebuildStatistics() builds from scratch, exactly (the sums
 *      are exact, so the order of changes cannot show);
 *   2. every figure read from them equals the same figure recomputed by plain SQL from the source
 *      tables (lib/statistics/recompute.ts, the statistics as they were computed before they were
 *      kept), for one practical, one cohort, per cohort, per instrument and across two practicals.
 * Seeded (mulberry32), so a failure can be replayed.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { Op } from 'sequelize';
import { sequelize } from '@/lib/db';
import { models } from '@/models';
import { checkStoredSubmission } from '@/lib/submissions/check';
import { acceptProposal } from '@/lib/marking/marks';
import { keptSnapshot, rebuildStatistics } from '@/lib/statistics/keep';
import * as kept from '@/lib/statistics/queries';
import * as fresh from '@/lib/statistics/recompute';
import { buildWorld, type World } from '../helpers/world';
import { createPractical, rng, seedSubmissions } from './statistics-seed';

let world: World;
let practicalA: number;
let practicalB: number;
let lastYear: number;
let cohortIds: number[];

async function newStudent(cohortId: number, tag: string) {
  const { User, CourseMembership } = models();
  const u = await User.create({
    email: `${tag}@kept.example`,
    name: `Kept ${tag}`,
    passwordHash: null,
    isAdmin: false,
    studentNumber: null,
  });
  await CourseMembership.create({ userId: u.id, courseId: world.course.id, role: 'student', cohortId });
  return u.id;
}

beforeAll(async () => {
  world = await buildWorld();
  const { Cohort } = models();
  lastYear = (
    await Cohort.create({ courseId: world.course.id, name: 'Cohort 1', term: '2025 Autumn', instrument: 'Bench 1', archivedAt: null })
  ).id;
  cohortIds = [world.cohort.id, world.otherCohort.id, lastYear];
  practicalA = (await createPractical(world.course.id, [world.cohort.id, world.otherCohort.id])).id;
  practicalB = (await createPractical(world.course.id, [lastYear])).id;
  const markers = [world.people.ta.id, world.people.otherTa.id];
  const a = [];
  for (let i = 0; i < 14; i++) a.push(await newStudent(world.cohort.id, `a${i}`));
  const b = [];
  for (let i = 0; i < 7; i++) b.push(await newStudent(world.otherCohort.id, `b${i}`));
  const c = [];
  for (let i = 0; i < 8; i++) c.push(await newStudent(lastYear, `c${i}`));
  await seedSubmissions({
    practicalId: practicalA,
    cohortId: world.cohort.id,
    studentIds: a,
    markerIds: markers,
    moderatorId: world.people.lead.id,
    seed: 21,
  });
  await seedSubmissions({
    practicalId: practicalA,
    cohortId: world.otherCohort.id,
    studentIds: b,
    markerIds: markers,
    moderatorId: world.people.lead.id,
    seed: 22,
  });
  // Two of last year's students took this year's practical again (a repeat year), and one is in both practicals' comparison.
  await seedSubmissions({
    practicalId: practicalB,
    cohortId: lastYear,
    studentIds: [...c, a[0], a[1]],
    markerIds: [world.people.ta.id],
    seed: 23,
  });
});

/** Numbers equal to 1e-9 (relative), everything else exactly. */
function expectSame(actual: unknown, expected: unknown, path = '') {
  if (typeof expected === 'number' && typeof actual === 'number') {
    if (Number.isNaN(expected)) return expect(Number.isNaN(actual), path).toBe(true);
    const tolerance = 1e-9 * Math.max(1, Math.abs(expected));
    if (Math.abs(actual - expected) > tolerance) expect(actual, path).toBe(expected);
    return;
  }
  if (Array.isArray(expected)) {
    expect(Array.isArray(actual), path).toBe(true);
    expect((actual as unknown[]).length, `${path}.length`).toBe(expected.length);
    expected.forEach((e, i) => expectSame((actual as unknown[])[i], e, `${path}[${i}]`));
    return;
  }
  if (expected && typeof expected === 'object') {
    const keys = new Set([...Object.keys(expected), ...Object.keys(actual as object)]);
    for (const k of keys) expectSame((actual as Record<string, unknown>)[k], (expected as Record<string, unknown>)[k], `${path}.${k}`);
    return;
  }
  expect(actual, path).toEqual(expected);
}

/**
 * Spreads: the kept figure is exact ((nΣx² − (Σx)²)/n² before one rounding) where plain SQL
 * subtracts two rounded averages, so they agree to the SQL's own rounding (relative 1e-6 of the
 * larger of the spread and the mean: the cancellation in mean(x²) − mean(x)²).
 */
function spreadsClose<T extends Record<string, unknown>>(a: T[], b: T[], keys: string[], meanKey: string) {
  expect(a.length).toBe(b.length);
  a.forEach((row, i) => {
    for (const k of keys) {
      const x = row[k] as number | null | undefined;
      const y = b[i][k] as number | null | undefined;
      if (y === null || x === null || y === undefined || x === undefined) expect(x).toBe(y);
      else expect(Math.abs(x - y)).toBeLessThanOrEqual(1e-6 * Math.max(1, Math.abs(y), Math.abs((b[i][meanKey] as number) ?? 0)));
      (row as Record<string, unknown>)[k] = (b[i] as Record<string, unknown>)[k];
    }
  });
}

const byGroup = <T extends { group: string }>(rows: T[]) => [...rows].sort((x, y) => (x.group < y.group ? -1 : 1));

async function compareWithRecomputation() {
  const scopes = [
    { practicalIds: [practicalA], cohortIds: [world.cohort.id, world.otherCohort.id] },
    { practicalIds: [practicalA], cohortIds: [world.cohort.id] },
    { practicalIds: [practicalA, practicalB], cohortIds },
  ];
  for (const scope of scopes) {
    for (const groupBy of ['none', 'cohort', 'instrument'] as const) {
      expectSame(
        byGroup(await kept.submissionCounts(scope, groupBy)),
        byGroup(await fresh.submissionCounts(scope, groupBy)),
        `counts ${groupBy}`,
      );
      const kq = await kept.quantityStatistics(scope, groupBy);
      const fq = await fresh.quantityStatistics(scope, groupBy);
      spreadsClose(kq as never, fq as never, ['sd'], 'mean');
      expectSame(kq, fq, `quantities ${groupBy}`);
      const km = byGroup(await kept.markSummary(scope, groupBy));
      const fm = byGroup(await fresh.markSummary(scope, groupBy));
      spreadsClose(km as never, fm as never, ['sdMark'], 'meanMark');
      expectSame(km, fm, `mark summary ${groupBy}`);
    }
    const ks = await kept.frequentSlips(scope, 50);
    const fs = await fresh.frequentSlips(scope, 50);
    // Quantities with equal counts may come in either order from plain SQL.
    expectSame(
      ks.map((s) => ({ ...s, keys: [...s.keys].sort() })),
      fs.map((s) => ({ ...s, keys: [...s.keys].sort() })),
      'slips',
    );
    const kmk = await kept.markerConsistency(scope, 10);
    const fmk = await fresh.markerConsistency(scope, 10);
    spreadsClose(kmk as never, fmk as never, ['sdMark', 'sdDifference'], 'meanMark');
    expectSame(kmk, fmk, 'markers');
  }
}

async function expectKeptEqualsRebuilt() {
  const before = await keptSnapshot();
  await rebuildStatistics();
  expect(await keptSnapshot()).toEqual(before);
}

describe('kept statistics', () => {
  it('after seeding, equal the rebuilt rows and the plain-SQL recomputation', async () => {
    await expectKeptEqualsRebuilt();
    await compareWithRecomputation();
  });

  it('stay equal through 120 random inserts, updates, re-checks, moves, deletions and transactions', async () => {
    const r = rng(2026);
    const pick = <T>(list: T[]): T => list[Math.floor(r() * list.length)];
    const { Submission, CheckResult, SlipFinding, Mark, Moderation } = models();
    const counted = async () =>
      Submission.findAll({
        where: { attempt: { [Op.gt]: 0 }, isMarkedAttempt: true, practicalId: [practicalA, practicalB] },
        order: [['id', 'ASC']],
      });
    const done: Record<string, number> = {};
    let n = 0;
    for (let step = 0; step < 120; step++) {
      const subs = await counted();
      const s = pick(subs);
      const op = pick([
        'recheck',
        'mark',
        'accept',
        'check-row',
        'insert',
        'supersede',
        'delete',
        'move',
        'second-cohort',
        'moderate',
        'release',
        'slip',
        'transaction',
        'rollback',
      ]);
      done[op] = (done[op] ?? 0) + 1;
      switch (op) {
        case 'recheck':
          // The engine's own check replaces every check row, slip and proposal of the submission.
          await checkStoredSubmission(s.id);
          break;
        case 'mark': {
          const m = await Mark.findOne({ where: { submissionId: s.id }, order: [['id', 'ASC']] });
          if (m) await m.update({ awarded: Math.round(r() * 4) / 2, proposed: r() < 0.3 ? null : m.proposed });
          break;
        }
        case 'accept':
          if (['submitted', 'marked'].includes(s.status)) await acceptProposal(world.people.ta.id, s.id, s.version).catch(() => undefined);
          break;
        case 'check-row': {
          const c = await CheckResult.findOne({ where: { submissionId: s.id }, order: [['id', 'DESC']] });
          if (c) {
            const rel = r() < 0.15 ? null : (r() - 0.5) * (r() < 0.2 ? 40 : 0.02);
            await CheckResult.update(
              { relativeDeviation: rel, verdict: rel === null ? 'not-checked' : pick(['within', 'partial', 'outside']) },
              { where: { id: c.id } },
            );
          }
          break;
        }
        case 'insert': {
          const cohortId = pick(cohortIds);
          const student = await newStudent(cohortId, `new${++n}`);
          await seedSubmissions({
            practicalId: cohortId === lastYear ? practicalB : practicalA,
            cohortId,
            studentIds: [student],
            markerIds: [pick([world.people.ta.id, world.people.otherTa.id])],
            moderatorId: world.people.lead.id,
            seed: 100 + step,
          });
          break;
        }
        case 'supersede': {
          // A new attempt: the old one stops counting, the new one counts (as submitDraft does).
          await Submission.update(
            { isMarkedAttempt: false },
            { where: { practicalId: s.practicalId, studentId: s.studentId, attempt: { [Op.gt]: 0 } } },
          );
          const last = await Submission.max<number, InstanceType<typeof Submission>>('attempt', {
            where: { practicalId: s.practicalId, studentId: s.studentId },
          });
          const next = await Submission.create({
            practicalId: s.practicalId,
            cohortId: s.cohortId,
            studentId: s.studentId,
            attempt: (last ?? 0) + 1,
            status: 'submitted',
            draft: null,
            submittedAt: new Date(),
            isMarkedAttempt: true,
            checkSummary: null,
            lineListHash: null,
            proposedTotal: 6,
            awardedTotal: null,
            maxTotal: 12,
            markedById: null,
            markedAt: null,
            releasedAt: null,
            resubmissionMessage: null,
          });
          await CheckResult.create({
            submissionId: next.id,
            key: 'bandCentre',
            species: 'H35Cl',
            basis: 'accuracy',
            reportedSI: 1,
            expectedSI: 1,
            deviation: 0,
            relativeDeviation: (r() - 0.5) / 100,
            verdict: 'within',
            slipCodes: '',
          });
          break;
        }
        case 'delete':
          if (r() < 0.5) await Submission.destroy({ where: { id: s.id } });
          else await s.destroy();
          break;
        case 'move':
          await s.update({
            cohortId: s.practicalId === practicalB ? lastYear : s.cohortId === world.cohort.id ? world.otherCohort.id : world.cohort.id,
          });
          break;
        case 'second-cohort': {
          // Data the app would not make (two counted attempts of one student, in two cohorts): students must still be counted once.
          if (s.practicalId !== practicalA) break;
          const last = await Submission.max<number, InstanceType<typeof Submission>>('attempt', {
            where: { practicalId: s.practicalId, studentId: s.studentId },
          });
          const twin = await Submission.create({
            practicalId: s.practicalId,
            cohortId: s.cohortId === world.cohort.id ? world.otherCohort.id : world.cohort.id,
            studentId: s.studentId,
            attempt: (last ?? 0) + 1,
            status: 'marked',
            draft: null,
            submittedAt: new Date(),
            isMarkedAttempt: true,
            checkSummary: null,
            lineListHash: null,
            proposedTotal: 5,
            awardedTotal: 7,
            maxTotal: 12,
            markedById: world.people.otherTa.id,
            markedAt: new Date(),
            releasedAt: null,
            resubmissionMessage: null,
          });
          await CheckResult.bulkCreate(
            (['consistency', 'accuracy'] as const).map((basis) => ({
              submissionId: twin.id,
              key: 'forceConstant',
              species: 'H35Cl',
              basis,
              reportedSI: 1,
              expectedSI: 1,
              deviation: 0,
              relativeDeviation: (r() - 0.5) / 50,
              verdict: 'partial',
              slipCodes: '',
            })),
          );
          break;
        }
        case 'moderate':
          await Moderation.create({
            submissionId: s.id,
            moderatorId: world.people.lead.id,
            markerId: s.markedById ?? world.people.ta.id,
            decision: r() < 0.5 ? 'changed' : 'confirmed',
            totalBefore: s.awardedTotal,
            totalAfter: s.awardedTotal,
            note: null,
          });
          break;
        case 'release':
          await Submission.update(
            {
              status: 'released',
              releasedAt: new Date(),
              awardedTotal: s.awardedTotal ?? Math.round(r() * 12),
              markedById: s.markedById ?? world.people.ta.id,
            },
            { where: { id: s.id } },
          );
          break;
        case 'slip':
          if (r() < 0.5)
            await SlipFinding.create({
              submissionId: s.id,
              key: pick(['bandCentre', 'reducedMass']),
              code: pick(['missing-2pi', 'power-of-ten']),
            });
          else await SlipFinding.destroy({ where: { submissionId: s.id } });
          break;
        case 'transaction':
          // Several changes in one transaction: kept once, just before it commits.
          await sequelize().transaction(async (t) => {
            await Mark.update({ awarded: 1 }, { where: { submissionId: s.id }, transaction: t });
            await Submission.update(
              { status: 'marked', markedById: world.people.otherTa.id, awardedTotal: 9 },
              { where: { id: s.id }, transaction: t },
            );
            await CheckResult.destroy({ where: { submissionId: s.id, basis: 'consistency' }, transaction: t });
          });
          break;
        case 'rollback':
          await sequelize()
            .transaction(async (t) => {
              await Submission.update({ isMarkedAttempt: false }, { where: { id: s.id }, transaction: t });
              await CheckResult.destroy({ where: { submissionId: s.id }, transaction: t });
              throw new Error('changed my mind');
            })
            .catch(() => undefined);
          break;
      }
      if (step % 40 === 39) await compareWithRecomputation();
    }
    expect(Object.keys(done).length).toBeGreaterThanOrEqual(12); // most kinds of change were exercised
    await compareWithRecomputation();
    await expectKeptEqualsRebuilt();
  });

  it('stay equal when many changes to one practical commit at the same time (on PostgreSQL, in parallel transactions)', async () => {
    const { Submission, Mark } = models();
    const subs = await Submission.findAll({
      where: { practicalId: practicalA, isMarkedAttempt: true, attempt: { [Op.gt]: 0 } },
      order: [['id', 'ASC']],
      limit: 24,
    });
    await Promise.all(
      subs.map(async (s, i) => {
        if (i % 3 === 0) return checkStoredSubmission(s.id);
        return sequelize().transaction(async (t) => {
          await Mark.update({ awarded: (i % 4) / 2 }, { where: { submissionId: s.id }, transaction: t });
          await Submission.update(
            {
              status: i % 2 ? 'released' : 'marked',
              releasedAt: i % 2 ? new Date() : null,
              markedById: world.people.ta.id,
              awardedTotal: i % 12,
            },
            { where: { id: s.id }, transaction: t },
          );
        });
      }),
    );
    await compareWithRecomputation();
    await expectKeptEqualsRebuilt();
  });
});
