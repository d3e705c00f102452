/**
 * Invented, checked and marked submissions for statistics tests and the benchmark, inserted
 * straight through the models with bulkCreate. Deterministic: a small seeded generator (mulberry32)
 * so a failing run can be repeated.
 */
import type { CreationAttributes } from 'sequelize';
import { models } from '@/models';
import type { CheckResult, Mark, Moderation, SlipFinding, Submission } from '@/models';

import { mulberry32 as rng } from '@/lib/spectrum/random';

export { rng };

export const SEED_QUANTITIES = [
  { key: 'bandCentre', species: 'H35Cl', unit: 'cm-1' },
  { key: 'forceConstant', species: 'H35Cl', unit: 'N/m' },
  { key: 'reducedMass', species: 'H35Cl', unit: 'u' },
  { key: 'bondLength', species: 'H35Cl', unit: 'Å' },
] as const;

const SLIP_POOL = ['missing-2pi', 'mass-numbers-used', 'speed-of-light-in-m-per-s', 'power-of-ten', 'an-unlisted-code'];

export async function createPractical(courseId: number, cohortIds: number[], title = 'HCl fundamental band') {
  const { Practical, PracticalCohort, QuantityDefinition } = models();
  const practical = await Practical.create({
    courseId,
    title,
    species: ['H35Cl'],
    rubric: [{ key: 'report', title: 'Report', marks: 4, guidance: '' }],
    copiedFromId: null,
    archivedAt: null,
  });
  for (const cohortId of cohortIds)
    await PracticalCohort.create({ practicalId: practical.id, cohortId, opensAt: null, deadline: new Date('2026-11-20T17:00:00Z') });
  await QuantityDefinition.bulkCreate(
    SEED_QUANTITIES.map((q, i) => ({
      practicalId: practical.id,
      key: q.key,
      species: q.species,
      unit: q.unit,
      marks: 2,
      referenceValueSI: null,
      referenceNote: null,
      position: i,
    })),
  );
  return practical;
}

export interface SeedOptions {
  practicalId: number;
  cohortId: number;
  studentIds: number[];
  markerIds: number[];
  moderatorId?: number;
  seed?: number;
  /** Added to every awarded mark of the first marker (to make a lenient marker). */
  firstMarkerBonus?: number;
}

/** One counted (marked-attempt) submission per student, plus an earlier superseded attempt for every third. */
export async function seedSubmissions(o: SeedOptions): Promise<number[]> {
  const m = models();
  const r = rng(o.seed ?? 1);
  const now = new Date();
  const subs: CreationAttributes<Submission>[] = [];
  o.studentIds.forEach((studentId, i) => {
    const markerId = o.markerIds[i % o.markerIds.length];
    const daysLate = r() < 0.2 ? 1 + Math.floor(r() * 3) : 0;
    const marked = r() < 0.85;
    const released = marked && r() < 0.5;
    if (i % 3 === 0) {
      subs.push({
        practicalId: o.practicalId,
        cohortId: o.cohortId,
        studentId,
        attempt: 1,
        status: 'submitted',
        draft: null,
        submittedAt: now,
        isMarkedAttempt: false,
        checkSummary: null,
        lineListHash: null,
        proposedTotal: null,
        awardedTotal: null,
        maxTotal: 12,
        markedById: null,
        markedAt: null,
        releasedAt: null,
        resubmissionMessage: null,
      });
    }
    const proposed = Math.round(r() * 12 * 2) / 2;
    const bonus = markerId === o.markerIds[0] ? (o.firstMarkerBonus ?? 0) : 0;
    const awarded = marked ? Math.min(12, Math.max(0, proposed + (r() < 0.3 ? (r() < 0.5 ? -1 : 1) : 0) + bonus)) : null;
    subs.push({
      practicalId: o.practicalId,
      cohortId: o.cohortId,
      studentId,
      attempt: i % 3 === 0 ? 2 : 1,
      status: released ? 'released' : marked ? 'marked' : 'submitted',
      draft: null,
      submittedAt: now,
      daysLate,
      flagLate: daysLate > 0,
      isMarkedAttempt: true,
      checkSummary: null,
      lineListHash: null,
      proposedTotal: proposed,
      awardedTotal: awarded,
      maxTotal: 12,
      markedById: marked ? markerId : null,
      markedAt: marked ? now : null,
      releasedAt: released ? now : null,
      resubmissionMessage: null,
    });
  });
  const created = await m.Submission.bulkCreate(subs);
  const checks: CreationAttributes<CheckResult>[] = [];
  const slips: CreationAttributes<SlipFinding>[] = [];
  const marks: CreationAttributes<Mark>[] = [];
  const mods: CreationAttributes<Moderation>[] = [];
  for (const s of created) {
    for (const q of SEED_QUANTITIES) {
      for (const basis of ['consistency', 'accuracy'] as const) {
        const roll = r();
        const notChecked = roll < 0.05;
        const slip = !notChecked && roll > 0.9 ? SLIP_POOL[Math.floor(r() * SLIP_POOL.length)] : null;
        const rel = notChecked
          ? 0
          : slip
            ? (r() < 0.5 ? -0.97 : 9.5) * (0.9 + r() * 0.2)
            : (r() - 0.5) * (basis === 'consistency' ? 0.01 : 0.06);
        const abs = Math.abs(rel);
        const verdict = notChecked
          ? 'not-checked'
          : abs <= (basis === 'consistency' ? 0.003 : 0.01)
            ? 'within'
            : abs <= 0.02
              ? 'partial'
              : 'outside';
        checks.push({
          submissionId: s.id,
          key: q.key,
          species: q.species,
          basis,
          reportedSI: 1 + rel,
          expectedSI: 1,
          deviation: rel,
          relativeDeviation: notChecked ? null : rel,
          verdict,
          slipCodes: slip ?? '',
        });
        if (slip) slips.push({ submissionId: s.id, key: q.key, code: slip });
      }
      if (s.isMarkedAttempt && s.markedById) {
        const p = Math.round(r() * 2 * 2) / 2;
        const a = r() < 0.25 ? Math.max(0, Math.min(2, p + (r() < 0.5 ? -0.5 : 0.5))) : p;
        marks.push({
          submissionId: s.id,
          itemKey: `${q.key}:${q.species}`,
          label: q.key,
          maxMarks: 2,
          proposed: p,
          awarded: a,
          comment: null,
          markerId: s.markedById,
        });
      }
    }
    if (s.isMarkedAttempt && s.markedById) {
      marks.push({
        submissionId: s.id,
        itemKey: 'rubric:report',
        label: 'Report',
        maxMarks: 4,
        proposed: null,
        awarded: Math.floor(r() * 5),
        comment: null,
        markerId: s.markedById,
      });
      if (o.moderatorId && r() < 0.2) {
        const changed = r() < 0.5;
        mods.push({
          submissionId: s.id,
          moderatorId: o.moderatorId,
          markerId: s.markedById,
          decision: changed ? 'changed' : 'confirmed',
          totalBefore: s.awardedTotal,
          totalAfter: changed ? (s.awardedTotal ?? 0) + 1 : s.awardedTotal,
          note: null,
        });
      }
    }
  }
  await m.CheckResult.bulkCreate(checks);
  await m.SlipFinding.bulkCreate(slips);
  await m.Mark.bulkCreate(marks);
  await m.Moderation.bulkCreate(mods);
  return created.map((s) => s.id);
}
