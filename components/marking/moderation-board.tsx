'use client';

import { useState } from 'react';
import { api, useApi } from '@/lib/api-client';
import type { ModerationSampleView } from '@/lib/marking/moderation';

type Sampled = ModerationSampleView['markers'][number]['sample'][number];

function SampleCard({ s, onDone }: { s: Sampled; onDone: () => void }) {
  const [marks, setMarks] = useState<Record<string, number>>(Object.fromEntries(s.items.map((i) => [i.itemKey, i.awarded ?? 0])));
  const [note, setNote] = useState('');
  const [msg, setMsg] = useState('');
  const changed = s.items.filter((i) => marks[i.itemKey] !== (i.awarded ?? 0));
  const submit = async (decision: 'confirmed' | 'changed') => {
    const r = await api.post(`/api/moderation/${s.id}`, {
      decision,
      version: s.version,
      note: note || null,
      items: decision === 'changed' ? changed.map((i) => ({ itemKey: i.itemKey, awarded: marks[i.itemKey] })) : [],
    });
    setMsg(r.ok ? (decision === 'confirmed' ? 'Confirmed.' : 'Changed.') : r.error.message);
    if (r.ok) onDone();
  };
  return (
    <li className="card">
      <h3 className="mb-1">
        {s.student}{' '}
        <span className="font-normal text-ink-soft">
          — {s.practical}, {s.cohort}
        </span>
      </h3>
      <p className="hint mb-2">
        Status {s.status}.{' '}
        {s.moderation ? `Moderated: ${s.moderation.decision}${s.moderation.note ? ` (${s.moderation.note})` : ''}.` : 'Not moderated yet.'}{' '}
        <a href={`/marking/${s.id}`}>Open the marking screen</a>
      </p>
      <table className="data-table stack-table mb-2">
        <thead>
          <tr>
            <th scope="col">Item</th>
            <th scope="col" className="num">
              Engine
            </th>
            <th scope="col" className="num">
              Marker
            </th>
            <th scope="col">Marker’s comment</th>
            <th scope="col" className="num">
              Moderated
            </th>
          </tr>
        </thead>
        <tbody>
          {s.items.map((i) => (
            <tr key={i.itemKey}>
              <th scope="row" className="text-left font-bold sm:font-normal">
                {i.label}
              </th>
              <td className="num" data-label="Engine">
                {i.proposed ?? '—'}
              </td>
              <td className="num" data-label="Marker">
                <span className="nowrap">
                  {i.awarded ?? '—'} / {i.maxMarks}
                </span>
              </td>
              <td className="text-xs" data-label={i.comment ? 'Comment' : ''}>
                {i.comment ?? ''}
              </td>
              <td className="num" data-label="Moderated">
                <div>
                  <label className="sr-only" htmlFor={`mod-${s.id}-${i.itemKey}`}>
                    Moderated marks for {i.label}
                  </label>
                  <input
                    id={`mod-${s.id}-${i.itemKey}`}
                    className="field w-20 text-right"
                    type="number"
                    min={0}
                    max={i.maxMarks}
                    step="0.5"
                    value={marks[i.itemKey]}
                    disabled={s.status === 'released'}
                    onChange={(e) => setMarks({ ...marks, [i.itemKey]: Number(e.target.value) })}
                  />
                </div>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="num mb-2">
        Engine total {s.proposedTotal ?? '—'} · marker total {s.awardedTotal ?? '—'}
      </p>
      <label className="label" htmlFor={`note-${s.id}`}>
        Note (required when changing)
      </label>
      <input id={`note-${s.id}`} className="field mb-2" value={note} onChange={(e) => setNote(e.target.value)} />
      <div className="flex flex-wrap gap-2">
        <button type="button" className="btn" onClick={() => submit('confirmed')}>
          Confirm marks
        </button>
        <button type="button" className="btn-quiet" disabled={changed.length === 0 || !note.trim()} onClick={() => submit('changed')}>
          Save changed marks
        </button>
      </div>
      <p role="status" aria-live="polite" className="mt-2 text-sm">
        {msg}
      </p>
    </li>
  );
}

export function ModerationBoard({ courseId }: { courseId: number }) {
  const { data, error, isLoading, mutate } = useApi<ModerationSampleView>(`/api/moderation?courseId=${courseId}`);
  if (error)
    return (
      <p className="error-text" role="alert">
        {error.message}
      </p>
    );
  if (isLoading || !data) return <p aria-live="polite">Loading…</p>;
  if (data.markers.length === 0) return <p className="card text-ink-soft">Nothing has been marked in this course yet.</p>;
  return (
    <div className="space-y-6">
      {data.markers.map((m) => (
        <section key={m.marker.id} aria-labelledby={`marker-${m.marker.id}`}>
          <h2 id={`marker-${m.marker.id}`} className="mb-2">
            {m.marker.name}{' '}
            <span className="font-normal text-ink-soft">
              — {m.sample.length} of {m.markedCount} marked
            </span>
          </h2>
          <ul className="space-y-3">
            {m.sample.map((s) => (
              <SampleCard key={`${s.id}-${s.version}`} s={s} onDone={() => mutate()} />
            ))}
          </ul>
        </section>
      ))}
    </div>
  );
}
