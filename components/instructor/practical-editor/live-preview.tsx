'use client';
/** A value an instructor types, with the verdict and marks it would get in a cohort; writes nothing. */
import { useEffect, useState } from 'react';
import type { VerdictPreview } from '@/lib/instructor/practicals';
import { publishedSource } from '@/lib/display';
import { api } from '@/lib/api-client';
import { VerdictLabel } from '../verdict';
import type { Detail } from './shared';
import { Field } from '@/components/ui/field';

export function LivePreview({ detail }: { detail: Detail }) {
  const [f, setF] = useState({ quantityId: '', cohort: 'course', value: '', unit: '', uncertainty: '', recomputed: '' });
  const [result, setResult] = useState<VerdictPreview | null>(null);
  const [msg, setMsg] = useState<string | null>(null);
  const quantity = detail.quantities.find((q) => String(q.id) === f.quantityId);
  const ready = quantity !== undefined && f.value !== '' && !Number.isNaN(Number(f.value));
  useEffect(() => {
    if (!quantity || !ready) return;
    const t = setTimeout(async () => {
      const r = await api.post<VerdictPreview>(`/api/practicals/${detail.practical.id}/preview`, {
        quantityDefinitionId: quantity.id,
        cohortId: f.cohort === 'course' ? null : Number(f.cohort),
        value: Number(f.value),
        unit: f.unit || quantity.unit,
        uncertainty: f.uncertainty ? Number(f.uncertainty) : null,
        recomputed: f.recomputed ? Number(f.recomputed) : null,
      });
      if (r.ok) {
        setResult(r.data);
        setMsg(null);
      } else {
        setResult(null);
        setMsg(r.error.message);
      }
    }, 300);
    return () => clearTimeout(t);
  }, [f, quantity, ready, detail]);
  // Without a value to try there is no verdict to show (the last one would mislead).
  const shown = ready ? result : null;
  const set = (k: keyof typeof f) => (e: React.ChangeEvent<HTMLInputElement | HTMLSelectElement>) => setF({ ...f, [k]: e.target.value });
  return (
    <section aria-labelledby="live-preview" className="card">
      <h2 id="live-preview" className="mb-1">
        Try a value
      </h2>
      <p className="hint mb-3">
        Type a value a student might report and see the verdict and marks it would get in a cohort. Nothing is saved.
      </p>
      <div className="grid gap-3 md:grid-cols-6">
        <Field id="pv-quantity" label="Quantity" className="md:col-span-2">
          <select className="field" value={f.quantityId} onChange={set('quantityId')}>
            <option value="">Choose…</option>
            {detail.quantities.map((q) => (
              <option key={q.id} value={q.id}>
                {q.label} · {q.species}
              </option>
            ))}
          </select>
        </Field>
        <Field id="pv-cohort" label="Cohort">
          <select className="field" value={f.cohort} onChange={set('cohort')}>
            <option value="course">Course default</option>
            {detail.cohorts
              .filter((c) => !c.archived)
              .map((c) => (
                <option key={c.id} value={c.id}>
                  {c.name} ({c.term})
                </option>
              ))}
          </select>
        </Field>
        <Field id="pv-value" label="Reported value">
          <input type="number" step="any" className="field num" value={f.value} onChange={set('value')} />
        </Field>
        <Field id="pv-unit" label="Unit">
          <input className="field" placeholder={quantity?.unit} value={f.unit} onChange={set('unit')} />
        </Field>
        <Field id="pv-recomputed" label="Recomputed from their data (optional)">
          <input type="number" step="any" className="field num" value={f.recomputed} onChange={set('recomputed')} />
        </Field>
      </div>
      <div aria-live="polite" className="mt-3">
        {msg && <p className="error-text">{msg}</p>}
        {shown && (
          <div>
            {shown.reference && (
              <p className="text-sm">
                Reference: <span className="num">{+shown.reference.value.toPrecision(7)}</span> {shown.reference.unit} (
                {shown.reference.kind === 'department' ? 'department value' : 'literature'}: {publishedSource(shown.reference.source)})
              </p>
            )}
            <table className="data-table stack-table mt-2" aria-label="Preview verdicts">
              <thead>
                <tr>
                  <th>Question</th>
                  <th>Verdict</th>
                  <th className="num">Marks</th>
                  <th>Band</th>
                  <th className="num">Deviation</th>
                </tr>
              </thead>
              <tbody>
                {shown.results.map((r) => (
                  <tr key={r.basis}>
                    <td data-label="">
                      <strong className="sm:font-normal">{r.basis}</strong>
                    </td>
                    <td data-label="Verdict">
                      <div>
                        <VerdictLabel verdict={r.verdict} />
                        {r.reason && <span className="hint block">{r.reason}</span>}
                      </div>
                    </td>
                    <td className="num" data-label="Marks">
                      {+r.marks.toFixed(2)} / {+r.maxMarks.toFixed(2)}
                    </td>
                    <td data-label="Band">
                      {r.band ? `${r.band} (${r.bandFrom === 'cohort' ? 'this cohort' : 'course default'})` : 'none set'}
                    </td>
                    <td className="num nowrap" data-label="Deviation">
                      {r.deviation === null
                        ? '—'
                        : `${r.deviation >= 0 ? '+' : '−'}${+Math.abs(r.deviation).toPrecision(4)} ${quantity?.unitDisplay ?? ''}`}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </div>
    </section>
  );
}
