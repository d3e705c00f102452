'use client';
/**
 * The practical editor: the definition, the quantities students report, tolerance bands, a value
 * to try against them, and copying to a new term. Each part is its own component in this folder;
 * they share the practical as GET /api/practicals/[id] answers it, and reload it after a change.
 */
import { useApi } from '@/lib/api-client';
import type { Detail } from './shared';
import { Details } from './details';
import { Quantities } from './quantities';
import { Bands } from './bands';
import { LivePreview } from './live-preview';
import { CopyPractical } from './copy-practical';

export type { Detail } from './shared';

export function PracticalEditor({ practicalId, courseId }: { practicalId: number; courseId: number }) {
  const { data, mutate, error } = useApi<Detail>(`/api/practicals/${practicalId}`);
  if (error) return <p className="error-text">{error.message}</p>;
  if (!data) return <p className="text-ink-soft">Loading…</p>;
  const reload = () => void mutate();
  return (
    <div className="space-y-6">
      {data.submissions > 0 && <p className="card text-sm">{data.submissions} submission(s) have been checked against this practical.</p>}
      <Details detail={data} onSaved={reload} />
      <Quantities detail={data} onChange={reload} />
      <Bands detail={data} onChange={reload} />
      <LivePreview detail={data} />
      <CopyPractical detail={data} courseId={courseId} />
    </div>
  );
}
