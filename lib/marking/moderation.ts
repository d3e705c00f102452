/**
 * Moderation: a share of each marker's marked submissions, chosen by a stable hash of the
 * submission id so the sample does not change between page loads, shown with the engine's
 * proposal beside the marker's marks. The moderator confirms or changes them.
 */
import crypto from 'node:crypto';
import { Op } from 'sequelize';
import { sequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { HttpError } from '@/lib/http';
import { models } from '@/models';
import { claimVersion } from './marks';
import { totalAfterPenalty } from './totals';
import type { Serialized } from '@/lib/serialized';

export const DEFAULT_SHARE = 0.1;

const rank = (id: number) => crypto.createHash('sha256').update(`moderation:${id}`).digest().readUInt32BE(0);

/** ceil(share × n), at least 1 when the marker marked anything. */
export function sampleSize(n: number, share = DEFAULT_SHARE): number {
  return n === 0 ? 0 : Math.max(1, Math.ceil(n * share - 1e-9));
}

/** GET /api/moderation's answer. */
export type ModerationSampleView = { markers: Serialized<Awaited<ReturnType<typeof moderationSample>>> };

export async function moderationSample(courseId: number, share = DEFAULT_SHARE) {
  const { Submission, Practical, User, Cohort, Moderation, Mark } = models();
  const practicals = await Practical.findAll({ where: { courseId }, attributes: ['id', 'title'] });
  if (!practicals.length) return [];
  const subs = await Submission.findAll({
    where: {
      practicalId: practicals.map((p) => p.id),
      status: { [Op.in]: ['marked', 'released'] },
      isMarkedAttempt: true,
      markedById: { [Op.ne]: null },
    },
    include: [
      { model: User, as: 'student', attributes: ['name'] },
      { model: Cohort, attributes: ['name', 'term'] },
    ],
    order: [['id', 'ASC']],
  });
  const byMarker = new Map<number, typeof subs>();
  for (const s of subs) byMarker.set(s.markedById!, [...(byMarker.get(s.markedById!) ?? []), s]);
  const markers = await User.findAll({ where: { id: [...byMarker.keys()] }, attributes: ['id', 'name'] });
  const picked = [...byMarker.entries()].flatMap(([, list]) =>
    [...list].sort((a, b) => rank(a.id) - rank(b.id)).slice(0, sampleSize(list.length, share)),
  );
  const ids = picked.map((s) => s.id);
  const [mods, marks] = ids.length
    ? await Promise.all([
        Moderation.findAll({ where: { submissionId: ids }, order: [['id', 'ASC']] }),
        Mark.findAll({ where: { submissionId: ids }, order: [['id', 'ASC']] }),
      ])
    : [[], []];
  const title = new Map(practicals.map((p) => [p.id, p.title]));
  return [...byMarker.entries()].map(([markerId, list]) => ({
    marker: { id: markerId, name: markers.find((m) => m.id === markerId)?.name ?? `#${markerId}` },
    markedCount: list.length,
    sample: picked
      .filter((s) => s.markedById === markerId)
      .map((s) => {
        const r = s as typeof s & { student: { name: string }; Cohort: { name: string; term: string } };
        const last = mods.filter((m) => m.submissionId === s.id).at(-1);
        return {
          id: s.id,
          version: s.version,
          status: s.status,
          student: r.student.name,
          cohort: `${r.Cohort.name} (${r.Cohort.term})`,
          practical: title.get(s.practicalId) ?? '',
          proposedTotal: s.proposedTotal,
          awardedTotal: s.awardedTotal,
          latePenalty: s.latePenalty,
          moderation: last ? { decision: last.decision, note: last.note, at: last.createdAt.toISOString() } : null,
          items: marks
            .filter((m) => m.submissionId === s.id)
            .map((m) => ({
              itemKey: m.itemKey,
              label: m.label,
              maxMarks: m.maxMarks,
              proposed: m.proposed,
              awarded: m.awarded,
              comment: m.comment,
            })),
        };
      }),
  }));
}

export async function moderate(
  moderatorId: number,
  submissionId: number,
  input: { decision: 'confirmed' | 'changed'; version: number; items: { itemKey: string; awarded: number }[]; note?: string | null },
) {
  const { Submission, Mark, Moderation } = models();
  return sequelize().transaction(async (t) => {
    const s = await Submission.findByPk(submissionId, { transaction: t });
    if (!s) throw new HttpError(404, 'Not found.');
    if (!s.markedById || !['marked', 'released'].includes(s.status)) throw new HttpError(409, 'Only marked submissions can be moderated.');
    if (input.decision === 'changed' && s.status === 'released')
      throw new HttpError(409, 'This feedback has already been released; its marks cannot be changed in moderation.');
    const marks = await Mark.findAll({ where: { submissionId }, transaction: t });
    const byKey = new Map(marks.map((m) => [m.itemKey, m]));
    for (const item of input.items) {
      const m = byKey.get(item.itemKey);
      if (!m) throw new HttpError(400, `Unknown mark item: ${item.itemKey}.`);
      if (item.awarded > m.maxMarks + 1e-9) throw new HttpError(400, `${m.label}: at most ${m.maxMarks} marks.`);
    }
    if (input.decision === 'changed' && input.items.length === 0) throw new HttpError(400, 'Give the changed marks.');
    await claimVersion(submissionId, input.version, t, ['marked', 'released']);
    const totalBefore = s.awardedTotal;
    const before: Record<string, unknown> = {};
    const after: Record<string, unknown> = {};
    if (input.decision === 'changed') {
      for (const item of input.items) {
        const m = byKey.get(item.itemKey)!;
        if (m.awarded === item.awarded) continue;
        before[item.itemKey] = m.awarded;
        after[item.itemKey] = item.awarded;
        await m.update({ awarded: item.awarded }, { transaction: t });
      }
    }
    const totalAfter = totalAfterPenalty(
      marks.map((m) => m.awarded),
      s.latePenalty,
    );
    if (input.decision === 'changed') await s.update({ awardedTotal: totalAfter }, { transaction: t });
    const row = await Moderation.create(
      { submissionId, moderatorId, markerId: s.markedById, decision: input.decision, totalBefore, totalAfter, note: input.note ?? null },
      { transaction: t },
    );
    await audit(
      {
        actorId: moderatorId,
        action: `moderation.${input.decision}`,
        entityType: 'submission',
        entityId: submissionId,
        before: { ...before, awardedTotal: totalBefore },
        after: { ...after, awardedTotal: totalAfter, moderationId: row.id },
      },
      t,
    );
    return { id: row.id, decision: row.decision, totalBefore, totalAfter };
  });
}
