import type { Transaction } from 'sequelize';
import { models } from '@/models';

/** Record who changed what, with the state before and after. */
export async function audit(
  entry: { actorId: number | null; action: string; entityType: string; entityId: number | null; before?: unknown; after?: unknown },
  transaction?: Transaction,
): Promise<void> {
  await models().AuditEntry.create({ ...entry, before: entry.before ?? null, after: entry.after ?? null }, { transaction });
}
