/**
 * Model hooks that keep the statistics (keep.ts) up to date: every create, update or delete of a
 * submission, check result, slip finding, mark or moderation through the models notes the
 * submission it belongs to. Updates that touch nothing the statistics use (a draft, a version
 * counter, a flag) are ignored.
 */
import type { ModelStatic, Model, Transaction, WhereOptions } from 'sequelize';
import { noteChangedSubmissions } from './keep';

type AnyModel = ModelStatic<Model>;
type HookOptions = {
  transaction?: Transaction | null;
  where?: WhereOptions;
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- Sequelize types `fields` differently per hook; these handlers only compare the names as strings
  fields?: any[];
  attributes?: Record<string, unknown>;
  keptIds?: number[];
};

interface Kept {
  /** The column naming the submission (id for submissions themselves). */
  column: string;
  /** Columns whose change matters to the statistics. */
  fields: readonly string[];
}

const KEPT: Record<string, Kept> = {
  Submission: {
    column: 'id',
    fields: [
      'practicalId',
      'cohortId',
      'studentId',
      'status',
      'submittedAt',
      'isMarkedAttempt',
      'daysLate',
      'releasedAt',
      'awardedTotal',
      'proposedTotal',
      'maxTotal',
      'markedById',
    ],
  },
  CheckResult: { column: 'submissionId', fields: ['submissionId', 'key', 'species', 'basis', 'verdict', 'relativeDeviation'] },
  SlipFinding: { column: 'submissionId', fields: ['submissionId', 'key', 'code'] },
  Mark: { column: 'submissionId', fields: ['submissionId', 'awarded', 'proposed'] },
  Moderation: { column: 'submissionId', fields: ['submissionId', 'markerId', 'decision'] },
};

/** Ids named directly by a where clause ({ id: 5 } or { submissionId: [1, 2] }), or null when it says something else. */
function idsInWhere(where: WhereOptions | undefined, column: string): number[] | null {
  if (!where || typeof where !== 'object' || Object.getOwnPropertySymbols(where).length) return null;
  const keys = Object.keys(where);
  if (!keys.includes(column)) return null;
  const v = (where as Record<string, unknown>)[column];
  if (typeof v === 'number') return [v];
  if (Array.isArray(v) && v.every((x) => typeof x === 'number')) return v as number[];
  return null;
}

const countedNow = (s: Model) =>
  s.get('status') !== 'draft' && s.get('submittedAt') !== null && s.get('submittedAt') !== undefined && s.get('isMarkedAttempt') !== false;

const touches = (kept: Kept, fields: unknown[] | undefined) => !fields || fields.some((f) => kept.fields.includes(String(f)));

export function keepStatisticsHooks(models: Record<string, AnyModel>): void {
  for (const [name, kept] of Object.entries(KEPT)) {
    const model = models[name];
    if (!model) continue;
    // Sequelize's hook types differ per event; each handler below states what it reads.
    const hook = (event: string, fn: (...args: never[]) => Promise<void>) =>
      (model as unknown as { addHook: (event: string, name: string, fn: unknown) => void }).addHook(event, 'keepStatistics', fn);
    const idOf = (instance: Model) => Number(instance.get(kept.column));
    /** Before a bulk update or delete, find the rows it will touch (afterwards they may no longer match). */
    const findIds = async (options: HookOptions) => {
      const direct = idsInWhere(options.where, kept.column);
      if (direct) return direct;
      const rows = await model.findAll({
        where: options.where,
        attributes: [kept.column],
        transaction: options.transaction ?? undefined,
        raw: true,
      });
      return rows.map((r) => Number((r as unknown as Record<string, unknown>)[kept.column]));
    };
    hook('afterCreate', async (instance: Model, options: HookOptions) => {
      // A new draft (or any uncounted attempt) contributes nothing and changes no one else's figures.
      if (name === 'Submission' && !countedNow(instance)) return;
      await noteChangedSubmissions([idOf(instance)], options.transaction);
    });
    hook('afterBulkCreate', async (instances: Model[], options: HookOptions) => {
      const list = name === 'Submission' ? instances.filter(countedNow) : instances;
      await noteChangedSubmissions([...new Set(list.map(idOf))], options.transaction);
    });
    hook('afterUpdate', async (instance: Model, options: HookOptions) => {
      if (!touches(kept, options.fields)) return;
      const ids = [idOf(instance)];
      // A row moved to another submission changes the statistics of both.
      const before = (instance as unknown as { _previousDataValues?: Record<string, unknown> })._previousDataValues?.[kept.column];
      if (typeof before === 'number' && before !== ids[0]) ids.push(before);
      await noteChangedSubmissions(ids, options.transaction);
    });
    hook('afterDestroy', async (instance: Model, options: HookOptions) => {
      await noteChangedSubmissions([idOf(instance)], options.transaction);
    });
    hook('beforeBulkUpdate', async (options: HookOptions) => {
      const fields = options.fields ?? Object.keys(options.attributes ?? {});
      if (touches(kept, fields)) options.keptIds = await findIds(options);
    });
    hook('afterBulkUpdate', async (options: HookOptions) => {
      if (!options.keptIds?.length) return;
      const ids = [...options.keptIds];
      const moved = options.attributes?.[kept.column];
      if (typeof moved === 'number') ids.push(moved);
      await noteChangedSubmissions(ids, options.transaction);
    });
    hook('beforeBulkDestroy', async (options: HookOptions) => {
      options.keptIds = await findIds(options);
    });
    hook('afterBulkDestroy', async (options: HookOptions) => {
      if (options.keptIds?.length) await noteChangedSubmissions(options.keptIds, options.transaction);
    });
  }
}
