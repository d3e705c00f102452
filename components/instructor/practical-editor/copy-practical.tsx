'use client';
/** Copies the practical for a new term: cohort bands move to the cohort chosen, or are dropped. */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { api } from '@/lib/api-client';
import type { PracticalCreated } from '@/lib/instructor/practicals';
import { cohortLabel, fromLocal, Status, type Detail, type Msg } from './shared';

export function CopyPractical({ detail, courseId }: { detail: Detail; courseId: number }) {
  const router = useRouter();
  const overridden = [...new Set(detail.quantities.flatMap((q) => q.bands.map((b) => b.cohortId)).filter((x): x is number => x !== null))];
  const [title, setTitle] = useState(`${detail.practical.title} (copy)`);
  const [map, setMap] = useState<Record<string, string>>({});
  const [deadlines, setDeadlines] = useState<Record<number, string>>({});
  const [msg, setMsg] = useState<Msg>(null);
  async function copy() {
    const r = await api.post<PracticalCreated>(`/api/practicals/${detail.practical.id}/copy`, {
      title,
      cohortMap: Object.fromEntries(overridden.map((id) => [String(id), map[id] ? Number(map[id]) : null])),
      deadlines: Object.entries(deadlines)
        .filter(([, v]) => v)
        .map(([k, v]) => ({ cohortId: Number(k), deadline: fromLocal(v) })),
    });
    if (!r.ok) return setMsg({ ok: false, text: r.error.message });
    router.push(`/courses/${courseId}/practicals/${r.data.practical.id}`);
  }
  const open = detail.cohorts.filter((c) => !c.archived);
  return (
    <section aria-labelledby="copy" className="card">
      <h2 id="copy" className="mb-1">
        Copy to a new term
      </h2>
      <p className="hint mb-3">Copies the definition, quantities and bands. Cohort bands move to the cohort you choose, or are dropped.</p>
      <label htmlFor="copy-title" className="label">
        Title of the copy
      </label>
      <input id="copy-title" className="field mb-3" value={title} onChange={(e) => setTitle(e.target.value)} />
      {overridden.map((id) => (
        <div key={id} className="mb-2">
          <label htmlFor={`copy-map-${id}`} className="text-sm">
            Bands of {cohortLabel(detail.cohorts, id)} go to
          </label>
          <select id={`copy-map-${id}`} className="field" value={map[id] ?? ''} onChange={(e) => setMap({ ...map, [id]: e.target.value })}>
            <option value="">Drop them</option>
            {open.map((c) => (
              <option key={c.id} value={c.id}>
                {c.name} ({c.term})
              </option>
            ))}
          </select>
        </div>
      ))}
      <fieldset className="mb-3">
        <legend className="label">Deadlines of the copy (UTC)</legend>
        <div className="grid gap-3 md:grid-cols-3">
          {open.map((c) => (
            <div key={c.id}>
              <label htmlFor={`copy-deadline-${c.id}`} className="text-sm">
                {c.name} ({c.term})
              </label>
              <input
                id={`copy-deadline-${c.id}`}
                type="datetime-local"
                className="field num"
                value={deadlines[c.id] ?? ''}
                onChange={(e) => setDeadlines({ ...deadlines, [c.id]: e.target.value })}
              />
            </div>
          ))}
        </div>
      </fieldset>
      <button type="button" className="btn" disabled={!title.trim()} onClick={copy}>
        Copy practical
      </button>
      <Status message={msg} />
    </section>
  );
}
