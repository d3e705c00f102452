/**
 * The statistics cache (lib/statistics/cache.ts) never serves figures older than the rows: every
 * kind of write behind a report (a mark, a check result replaced, a submission removed, a
 * moderation) changes the answer at once, and a cached answer equals an uncached one.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { GET as getStats } from '@/app/api/statistics/practicals/[id]/route';
import { clearStatisticsCache } from '@/lib/statistics/cache';
import type { PracticalReport } from '@/lib/statistics/report';
import { models } from '@/models';
import { apiRequest, params } from '../helpers/session';
import { buildWorld, type World } from '../helpers/world';
import { createPractical, seedSubmissions } from './statistics-seed';

let world: World;
let practicalId: number;
let submissionIds: number[];

async function report(): Promise<PracticalReport> {
  const res = await getStats(
    await apiRequest(`/api/statistics/practicals/${practicalId}?cohortId=${world.cohort.id}`, { as: world.people.lead.id }),
    params({ id: String(practicalId) }),
  );
  expect(res.status).toBe(200);
  return res.json();
}

async function uncached(): Promise<PracticalReport> {
  process.env.STATS_CACHE = 'off';
  try {
    return await report();
  } finally {
    delete process.env.STATS_CACHE;
  }
}

beforeAll(async () => {
  world = await buildWorld();
  const { User, CourseMembership } = models();
  const ids = [world.people.student.id];
  for (let i = 0; i < 11; i++) {
    const u = await User.create({
      email: `cache${i}@stats.example`,
      name: `Cache student ${i}`,
      passwordHash: null,
      isAdmin: false,
      studentNumber: `CA${1000 + i}`,
    });
    await CourseMembership.create({ userId: u.id, courseId: world.course.id, role: 'student', cohortId: world.cohort.id });
    ids.push(u.id);
  }
  practicalId = (await createPractical(world.course.id, [world.cohort.id])).id;
  submissionIds = await seedSubmissions({
    practicalId,
    cohortId: world.cohort.id,
    studentIds: ids,
    markerIds: [world.people.ta.id],
    moderatorId: world.people.lead.id,
    seed: 5,
  });
  clearStatisticsCache();
});

describe('statistics cache', () => {
  it('a repeated question gets the same answer as an uncached one', async () => {
    const first = await report();
    expect(await report()).toEqual(first);
    expect(await uncached()).toEqual(first);
  });

  it('a changed mark, a replaced check result, a new moderation and a removed submission show at once', async () => {
    const { Mark, CheckResult, Moderation, Submission } = models();
    const counted = await Submission.findAll({ where: { id: submissionIds, isMarkedAttempt: true, markedById: world.people.ta.id } });
    const start = await report();

    const mark = (await Mark.findOne({ where: { submissionId: counted[0].id, proposed: { [(await import('sequelize')).Op.ne]: null } } }))!;
    await mark.update({ awarded: mark.proposed === 0 ? 0.5 : 0, comment: 'cache test' });
    const afterMark = await report();
    expect(afterMark).toEqual(await uncached());
    expect(afterMark.markers.rows[0].overrides).not.toBe(start.markers.rows[0].overrides);

    const check = (await CheckResult.findOne({ where: { submissionId: counted[1].id, key: 'bandCentre', basis: 'accuracy' } }))!;
    const { id: _id, createdAt: _c, updatedAt: _u, ...rest } = check.get({ plain: true });
    await check.destroy();
    await CheckResult.create({ ...rest, relativeDeviation: 20, verdict: 'outside' }); // 2000 %, beyond every seeded value
    const afterCheck = await report();
    expect(afterCheck).toEqual(await uncached());
    expect(afterCheck.quantities.find((q) => q.key === 'bandCentre' && q.basis === 'accuracy')!.box!.max).toBeCloseTo(2000, 9);

    const before = (await report()).markers.rows[0].moderations;
    await Moderation.create({
      submissionId: counted[2].id,
      moderatorId: world.people.lead.id,
      markerId: world.people.ta.id,
      decision: 'changed',
      totalBefore: 5,
      totalAfter: 6,
      note: null,
    });
    expect((await report()).markers.rows[0].moderations).toBe(before + 1);

    const submitted = (await report()).counts.submitted;
    await Submission.destroy({ where: { id: counted[3].id } });
    const afterDelete = await report();
    expect(afterDelete.counts.submitted).toBe(submitted - 1);
    expect(afterDelete).toEqual(await uncached());
  });
});
