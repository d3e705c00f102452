'use client';
/**
 * Tolerance bands per quantity, course default or per cohort. With submissions already checked,
 * the server answers 409 with their count and the instructor chooses whether to re-check them.
 */
import { useState } from 'react';
import { api } from '@/lib/api-client';
import type { BandChange } from '@/lib/instructor/practicals';
import { cohortLabel, Status, type Detail, type Msg } from './shared';
import { Field } from '@/components/ui/field';

type BandForm = { quantityId: string; scope: string; basis: string; kind: string; inner: string; outer: string; unit: string };
type Method = 'PUT' | 'DELETE';
type PendingChange = { body: Record<string, unknown>; count: number; method: Method };

/**
 * Sends a band change. A 409 naming already-checked submissions becomes a pending change the
 * instructor settles with `submit(pending.method, { ...pending.body, recheck })`.
 */
function useBandChange(detail: Detail, onChange: () => void) {
  const [msg, setMsg] = useState<Msg>(null);
  const [pending, setPending] = useState<PendingChange | null>(null);
  async function submit(method: Method, body: Record<string, unknown>) {
    const url = `/api/practicals/${detail.practical.id}/bands`;
    const r = method === 'PUT' ? await api.put<BandChange>(url, body) : await api.delete<BandChange>(url, body);
    if (!r.ok && r.status === 409 && typeof r.error.body.submissions === 'number' && r.error.body.submissions)
      return setPending({ body, count: r.error.body.submissions, method });
    setPending(null);
    if (!r.ok) return setMsg({ ok: false, text: r.error.message });
    setMsg({
      ok: true,
      text: `${method === 'PUT' ? 'Band saved' : 'Band removed'}${typeof r.data.rechecked === 'number' ? `; ${r.data.rechecked} submission(s) re-checked` : ''}.`,
    });
    onChange();
  }
  return { msg, pending, submit, cancel: () => setPending(null) };
}

export function Bands({ detail, onChange }: { detail: Detail; onChange: () => void }) {
  const { msg, pending, submit, cancel } = useBandChange(detail, onChange);
  return (
    <section aria-labelledby="bands" className="card">
      <h2 id="bands" className="mb-1">
        Tolerance bands
      </h2>
      <p className="hint mb-3">
        Consistency: is the number right from the student&apos;s own data? Accuracy: is the measurement close to the reference value? A
        cohort&apos;s own band replaces the course default for that cohort. Inner band: full marks; outer band: partial credit.
      </p>
      <BandEditor detail={detail} onSave={(body) => submit('PUT', body)} />
      {pending && <RecheckQuestion pending={pending} submit={submit} cancel={cancel} />}
      <Status message={msg} />
      <h3 className="mb-2 mt-4">Bands set</h3>
      <BandsTable detail={detail} onRemove={(bandId) => submit('DELETE', { bandId })} />
    </section>
  );
}

/** The fields of one band and its Save button; the body sent is in the units the API takes (a fraction for %). */
function BandEditor({ detail, onSave }: { detail: Detail; onSave: (body: Record<string, unknown>) => void }) {
  const [f, setF] = useState<BandForm>({
    quantityId: '',
    scope: 'course',
    basis: 'accuracy',
    kind: 'absolute',
    inner: '',
    outer: '',
    unit: '',
  });
  const quantity = detail.quantities.find((q) => String(q.id) === f.quantityId);
  // An absolute band is in the quantity's unit unless the instructor types another.
  const unit = f.unit || (quantity && f.kind === 'absolute' ? quantity.unit : '');
  const scale = f.kind === 'relative' ? 0.01 : 1;
  function save() {
    onSave({
      quantityDefinitionId: Number(f.quantityId),
      cohortId: f.scope === 'course' ? null : Number(f.scope),
      basis: f.basis,
      kind: f.kind,
      inner: Number(f.inner) * scale,
      outer: f.outer === '' ? null : Number(f.outer) * scale,
      unit: f.kind === 'absolute' ? unit : null,
    });
  }
  const set = (k: keyof BandForm) => (e: React.ChangeEvent<HTMLInputElement | HTMLSelectElement>) => setF({ ...f, [k]: e.target.value });
  const bandUnit = f.kind === 'relative' ? '(%)' : f.kind === 'sigma' ? '(σ)' : '';
  return (
    <>
      <div className="grid gap-3 md:grid-cols-4">
        <Field id="b-quantity" label="Quantity">
          <select className="field" value={f.quantityId} onChange={set('quantityId')}>
            <option value="">Choose…</option>
            {detail.quantities.map((q) => (
              <option key={q.id} value={q.id}>
                {q.label} · {q.species}
              </option>
            ))}
          </select>
        </Field>
        <Field id="b-scope" label="Applies to">
          <select className="field" value={f.scope} onChange={set('scope')}>
            <option value="course">Course default (all cohorts)</option>
            {detail.cohorts
              .filter((c) => !c.archived)
              .map((c) => (
                <option key={c.id} value={c.id}>
                  Only {c.name} ({c.term})
                </option>
              ))}
          </select>
        </Field>
        <Field id="b-basis" label="Question">
          <select className="field" value={f.basis} onChange={set('basis')}>
            <option value="consistency">Consistency</option>
            <option value="accuracy">Accuracy</option>
          </select>
        </Field>
        <Field id="b-kind" label="Kind">
          <select className="field" value={f.kind} onChange={set('kind')}>
            <option value="absolute">Absolute (± in a unit)</option>
            <option value="relative">Relative (± %)</option>
            <option value="sigma">Standard uncertainties (± n σ)</option>
          </select>
        </Field>
        <Field id="b-inner" label={<>Inner band {bandUnit}</>}>
          <input type="number" step="any" className="field num" value={f.inner} onChange={set('inner')} />
        </Field>
        <Field id="b-outer" label={<>Outer band, optional {bandUnit}</>}>
          <input type="number" step="any" className="field num" value={f.outer} onChange={set('outer')} />
        </Field>
        {f.kind === 'absolute' && (
          <Field id="b-unit" label="Unit">
            <input className="field" value={unit} onChange={set('unit')} />
          </Field>
        )}
      </div>
      <button type="button" className="btn mt-3" disabled={!f.quantityId || !f.inner} onClick={save}>
        Save band
      </button>
    </>
  );
}

function RecheckQuestion({
  pending,
  submit,
  cancel,
}: {
  pending: PendingChange;
  submit: (method: Method, body: Record<string, unknown>) => void;
  cancel: () => void;
}) {
  return (
    <div role="alertdialog" aria-labelledby="recheck-q" className="mt-3 rounded border-2 border-verdict-partial bg-verdict-partial-bg p-3">
      <p id="recheck-q" className="font-bold text-verdict-partial">
        {pending.count} submission(s) were already checked with the current band. Re-check them with the new one?
      </p>
      <div className="mt-2 flex flex-wrap gap-2">
        <button type="button" className="btn" onClick={() => submit(pending.method, { ...pending.body, recheck: true })}>
          Save and re-check
        </button>
        <button type="button" className="btn-quiet" onClick={() => submit(pending.method, { ...pending.body, recheck: false })}>
          Save, keep existing results
        </button>
        <button type="button" className="btn-quiet" onClick={cancel}>
          Cancel
        </button>
      </div>
    </div>
  );
}

/** Every band set, and under each quantity the consistency default when no course-wide consistency band replaces it. */
function BandsTable({ detail, onRemove }: { detail: Detail; onRemove: (bandId: number) => void }) {
  return (
    <table className="data-table stack-table" aria-label="Tolerance bands">
      <thead>
        <tr>
          <th>Quantity</th>
          <th>Applies to</th>
          <th>Question</th>
          <th>Band</th>
          <th>
            <span className="sr-only">Actions</span>
          </th>
        </tr>
      </thead>
      <tbody>
        {detail.quantities.flatMap((q) => [
          ...q.bands.map((b) => (
            <tr key={b.id}>
              <td data-label="">
                <strong className="sm:font-normal">
                  {q.label} · {q.species}
                </strong>
              </td>
              <td data-label="Applies to">{cohortLabel(detail.cohorts, b.cohortId)}</td>
              <td data-label="Question">{b.basis}</td>
              <td className="num" data-label="Band">
                {b.text}
              </td>
              <td data-label="">
                <button type="button" className="btn-quiet" onClick={() => onRemove(b.id)}>
                  Remove
                  <span className="sr-only">
                    {' '}
                    band {b.text} of {q.label}
                  </span>
                </button>
              </td>
            </tr>
          )),
          ...(q.consistencyDefault && !q.bands.some((b) => b.basis === 'consistency' && b.cohortId === null)
            ? [
                <tr key={`default-${q.id}`} data-testid="consistency-default">
                  <td data-label="">
                    <strong className="sm:font-normal">
                      {q.label} · {q.species}
                    </strong>
                  </td>
                  <td data-label="Applies to">Course default</td>
                  <td data-label="Question">consistency</td>
                  <td data-label="Band">Default — {q.consistencyDefault}</td>
                  <td data-label="" />
                </tr>,
              ]
            : []),
        ])}
      </tbody>
    </table>
  );
}
