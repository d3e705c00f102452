/** The audit log for the site administrator, filtered by action, who, what and when. */
import { Op, type WhereOptions } from 'sequelize';
import { z } from 'zod';
import { models } from '@/models';

export const AUDIT_PAGE_SIZE = 50;

const day = z
  .string()
  .trim()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Dates are written 2026-12-01.')
  .optional()
  .or(z.literal('').transform(() => undefined));

export const auditQuery = z.object({
  action: z
    .string()
    .trim()
    .max(80)
    .regex(/^[a-z.-]*$/, 'Choose an action from the list.')
    .optional()
    .default(''),
  actor: z.string().trim().max(254).optional().default(''),
  entity: z
    .string()
    .trim()
    .max(60)
    .regex(/^[a-z_]*$/, 'Choose a kind of record from the list.')
    .optional()
    .default(''),
  from: day,
  to: day,
  page: z.coerce.number().int().min(1).max(10_000).optional().default(1),
});
export type AuditQuery = z.output<typeof auditQuery>;

export type AuditRow = {
  id: number;
  at: string;
  actor: string;
  action: string;
  entity: string;
  entityId: number | null;
  before: unknown;
  after: unknown;
};

/** Values never shown, whatever a future audit entry carries. */
function redact(value: unknown, depth = 0): unknown {
  if (!value || typeof value !== 'object' || depth > 4) return value;
  if (Array.isArray(value)) return value.map((v) => redact(v, depth + 1));
  return Object.fromEntries(
    Object.entries(value as Record<string, unknown>).map(([k, v]) => [
      k,
      /password|token|secret|hash/i.test(k) ? '(hidden)' : redact(v, depth + 1),
    ]),
  );
}

export async function auditLog(q: AuditQuery) {
  const { AuditEntry, User } = models();
  const where: WhereOptions[] = [];
  if (q.action) where.push({ action: q.action });
  if (q.entity) where.push({ entityType: q.entity });
  if (q.from) where.push({ createdAt: { [Op.gte]: new Date(`${q.from}T00:00:00Z`) } });
  if (q.to) where.push({ createdAt: { [Op.lt]: new Date(new Date(`${q.to}T00:00:00Z`).getTime() + 86_400_000) } });
  if (q.actor) {
    const pattern = `%${q.actor.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    const who = await User.findAll({
      where: { [Op.or]: [{ email: { [Op.like]: pattern.toLowerCase() } }, { name: { [Op.like]: pattern } }] },
      attributes: ['id'],
      limit: 500,
    });
    where.push({ actorId: who.length ? who.map((u) => u.id) : [-1] });
  }
  const [{ rows, count }, actions, entities] = await Promise.all([
    AuditEntry.findAndCountAll({
      where: { [Op.and]: where },
      order: [['id', 'DESC']],
      limit: AUDIT_PAGE_SIZE,
      offset: (q.page - 1) * AUDIT_PAGE_SIZE,
    }),
    AuditEntry.findAll({ attributes: ['action'], group: ['action'], order: [['action', 'ASC']], raw: true }) as unknown as Promise<
      { action: string }[]
    >,
    AuditEntry.findAll({
      attributes: ['entityType'],
      group: ['entityType'],
      order: [['entityType', 'ASC']],
      raw: true,
    }) as unknown as Promise<{ entityType: string }[]>,
  ]);
  const actorIds = [...new Set(rows.map((r) => r.actorId).filter((x): x is number => x !== null))];
  const actors = actorIds.length ? await User.findAll({ where: { id: actorIds }, attributes: ['id', 'name', 'email'] }) : [];
  return {
    total: count,
    page: q.page,
    pages: Math.max(1, Math.ceil(count / AUDIT_PAGE_SIZE)),
    actions: actions.map((a) => a.action),
    entities: entities.map((e) => e.entityType),
    rows: rows.map((r): AuditRow => {
      const a = actors.find((u) => u.id === r.actorId);
      return {
        id: r.id,
        at: r.createdAt.toISOString(),
        actor: a ? `${a.name} (${a.email})` : r.actorId === null ? 'the system' : `account ${r.actorId}`,
        action: r.action,
        entity: r.entityType,
        entityId: r.entityId,
        before: redact(r.before),
        after: redact(r.after),
      };
    }),
  };
}
