/** A stored draft read back: what the schema accepts, over an empty draft for the practical's species. */
import { draftSchema, emptyDraft, type Draft } from '@/lib/schemas/submission';

export function readDraft(raw: unknown, species: string[]): Draft {
  const parsed = draftSchema.safeParse(raw ?? {});
  const base = emptyDraft(species);
  if (!parsed.success) return base;
  return { ...base, ...parsed.data, species: { ...base.species, ...parsed.data.species } };
}
