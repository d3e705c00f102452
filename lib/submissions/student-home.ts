/** Reads for the student's pages: open practicals per cohort with deadline, attempts and latest status. */
import type { Actor } from '@/lib/authz';
import { cohortName } from '@/lib/display';
import { models } from '@/models';

export async function openPracticalsFor(actor: Actor) {
  const { PracticalCohort, Practical, Submission, Cohort } = models();
  const cohortIds = actor.memberships.filter((m) => m.role === 'student' && m.cohortId !== null).map((m) => m.cohortId as number);
  if (!cohortIds.length) return [];
  // Separate queries, no include: model names are minified in production builds, which breaks include aliases.
  const pcs = await PracticalCohort.findAll({ where: { cohortId: cohortIds }, order: [['deadline', 'ASC']] });
  const practicals = await Practical.findAll({ where: { id: [...new Set(pcs.map((p) => p.practicalId))], archivedAt: null } });
  const cohorts = await Cohort.findAll({ where: { id: cohortIds } });
  // Every attempt of every practical listed, in one query (not one per practical).
  const subs = await Submission.findAll({
    where: { practicalId: practicals.map((p) => p.id), studentId: actor.id },
    attributes: ['practicalId', 'attempt', 'status', 'extraAttempts', 'releasedAt', 'awardedTotal', 'proposedTotal', 'maxTotal'],
    order: [['attempt', 'DESC']],
  });
  const now = new Date();
  const out = [];
  for (const pc of pcs) {
    if (pc.opensAt && pc.opensAt > now) continue;
    const practical = practicals.find((p) => p.id === pc.practicalId);
    if (!practical) continue;
    const cohort = cohorts.find((c) => c.id === pc.cohortId);
    const mine = subs.filter((s) => s.practicalId === practical.id);
    const used = mine.filter((s) => s.attempt > 0).length;
    const extra = mine.reduce((m, s) => Math.max(m, s.extraAttempts), 0);
    const latest = mine.find((s) => s.attempt > 0) ?? null;
    const released = Boolean(latest?.releasedAt);
    out.push({
      practicalId: practical.id,
      title: practical.title,
      mode: practical.mode,
      cohortName: cohort ? cohortName(cohort) : '',
      deadline: pc.deadline,
      attemptsLeft: Math.max(0, practical.maxAttempts + extra - used),
      attemptsUsed: used,
      hasDraft: mine.some((s) => s.attempt === 0),
      latestStatus: latest?.status ?? null,
      released,
      mark: released && latest ? { awarded: latest.awardedTotal ?? latest.proposedTotal, max: latest.maxTotal } : null,
    });
  }
  return out;
}

export function timeLeft(deadline: Date, now = new Date()): string {
  const ms = deadline.getTime() - now.getTime();
  if (ms <= 0) return 'deadline passed';
  const h = Math.floor(ms / 3_600_000);
  if (h < 48) return `${h} h ${Math.floor((ms % 3_600_000) / 60_000)} min left`;
  return `${Math.floor(h / 24)} days left`;
}
