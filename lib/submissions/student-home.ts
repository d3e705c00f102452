/** Reads for the student's pages: open practicals per cohort with deadline, attempts and latest status. */
import type { Actor } from '@/lib/authz';
import { models } from '@/models';

export async function openPracticalsFor(actor: Actor) {
  const { PracticalCohort, Practical, Submission, Cohort } = models();
  const cohortIds = actor.memberships.filter((m) => m.role === 'student' && m.cohortId !== null).map((m) => m.cohortId as number);
  if (!cohortIds.length) return [];
  // Separate queries, no include: model names are minified in production builds, which breaks include aliases.
  const pcs = await PracticalCohort.findAll({ where: { cohortId: cohortIds }, order: [['deadline', 'ASC']] });
  const practicals = await Practical.findAll({ where: { id: [...new Set(pcs.map((p) => p.practicalId))], archivedAt: null } });
  const cohorts = await Cohort.findAll({ where: { id: cohortIds } });
  const now = new Date();
  const out = [];
  for (const pc of pcs) {
    if (pc.opensAt && pc.opensAt > now) continue;
    const practical = practicals.find((p) => p.id === pc.practicalId);
    if (!practical) continue;
    const cohort = cohorts.find((c) => c.id === pc.cohortId);
    const subs = await Submission.findAll({ where: { practicalId: practical.id, studentId: actor.id }, order: [['attempt', 'DESC']] });
    const used = subs.filter((s) => s.attempt > 0).length;
    const extra = subs.reduce((m, s) => Math.max(m, s.extraAttempts), 0);
    const latest = subs.find((s) => s.attempt > 0) ?? null;
    out.push({
      practicalId: practical.id, title: practical.title, mode: practical.mode, cohortName: cohort?.name ?? '', deadline: pc.deadline,
      attemptsLeft: Math.max(0, practical.maxAttempts + extra - used), attemptsUsed: used,
      hasDraft: subs.some((s) => s.attempt === 0), latestStatus: latest?.status ?? null, released: Boolean(latest?.releasedAt),
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

