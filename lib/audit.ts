import type { Transaction } from 'sequelize';
import { models } from '@/models';

type AuditInput = {
  actorId: number | null;
  action: string;
  entityType: string;
  entityId: number | null;
  before?: unknown;
  after?: unknown;
};

/** Record who changed what, with the state before and after. */
export async function audit(entry: AuditInput, transaction?: Transaction): Promise<void> {
  await models().AuditEntry.create({ ...entry, before: entry.before ?? null, after: entry.after ?? null }, { transaction });
}

/** Record several changes (a release's group) in one statement. */
export async function auditAll(entries: AuditInput[], transaction?: Transaction): Promise<void> {
  if (!entries.length) return;
  await models().AuditEntry.bulkCreate(
    entries.map((entry) => ({ ...entry, before: entry.before ?? null, after: entry.after ?? null })),
    { transaction },
  );
}
