'use client';
import { useEffect, useState } from 'react';
import useSWR from 'swr';
import { useForm, useFieldArray } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { QUANTITIES, QUANTITY_KEYS, type QuantityKey } from '@/lib/grading/quantities';
import type { Verdict } from '@/lib/grading/tolerance';
import { practicalSchema, quantitySchema, type PracticalData, type PracticalInput, type QuantityInput } from '@/lib/schemas/instructor';
import { HazardNotes } from '@/components/hazard-notes';
import { VerdictLabel } from './verdict';
import { publishedSource } from '@/lib/display';
import { fetcher, send } from './api';

type Band = { id: number; quantityDefinitionId: number; cohortId: number | null; basis: 'consistency' | 'accuracy'; kind: 'absolute' | 'relative' | 'sigma'; inner: number; outer: number | null; unit: string | null; text: string };
type Quantity = {
  id: number; key: QuantityKey; species: string; unit: string; unitDisplay: string; marks: number; uncertaintyRequired: boolean; label: string;
  referenceKind: 'literature' | 'department'; referenceNote: string | null;
  reference: { kind: string; value: number; unit: string; source: string } | null; bands: Band[];
  consistencyDefault: string | null;
};
type Cohort = { id: number; name: string; term: string; instrument: string | null; archived: boolean };
export type Detail = {
  practical: PracticalData & { id: number; copiedFromId: number | null };
  deadlines: { cohortId: number; deadline: string }[];
  cohorts: Cohort[];
  quantities: Quantity[];
  submissions: number;
  instructionsHtml: string;
};
type Msg = { ok: boolean; text: string } | null;

function Status({ message }: { message: Msg }) {
  return <p aria-live="polite" className={message?.ok ? 'mt-2 text-sm text-verdict-within' : 'error-text'}>{message ? `${message.ok ? '✓' : '✗'} ${message.text}` : ''}</p>;
}

const cohortLabel = (cohorts: Cohort[], id: number | null) => (id === null ? 'Course default' : (() => { const c = cohorts.find((x) => x.id === id); return c ? `${c.name} (${c.term})` : `#${id}`; })());

export function PracticalEditor({ practicalId, courseId }: { practicalId: number; courseId: number }) {
  const { data, mutate, error } = useSWR<Detail>(`/api/practicals/${practicalId}`, fetcher);
  if (error) return <p className="error-text">{String(error.message)}</p>;
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

const toLocal = (iso: string) => iso.slice(0, 16);

function Details({ detail, onSaved }: { detail: Detail; onSaved: () => void }) {
  const p = detail.practical;
  const [msg, setMsg] = useState<Msg>(null);
  const [speciesText, setSpeciesText] = useState(p.species.join(', '));
  const [html, setHtml] = useState(detail.instructionsHtml);
  const [deadlines, setDeadlines] = useState<Record<number, string>>(Object.fromEntries(detail.deadlines.map((d) => [d.cohortId, toLocal(d.deadline)])));
  const form = useForm<PracticalInput, unknown, PracticalData>({
    resolver: zodResolver(practicalSchema),
    defaultValues: { ...p, deadlines: detail.deadlines },
  });
  const { register, handleSubmit, formState, watch, setValue, control } = form;
  const rubric = useFieldArray({ control, name: 'rubric' });
  const instructions = watch('instructions') ?? '';
  const hazard = watch('hazardNotes') ?? '';
  const lateRule = watch('lateRule');
  useEffect(() => {
    const t = setTimeout(async () => {
      const r = await send<{ html: string }>('POST', '/api/practicals/markdown', { markdown: instructions });
      if (r.ok) setHtml(r.data.html);
    }, 400);
    return () => clearTimeout(t);
  }, [instructions]);
  useEffect(() => {
    setValue('species', speciesText.split(/[,;\s]+/).filter(Boolean));
  }, [speciesText, setValue]);
  useEffect(() => {
    setValue('deadlines', Object.entries(deadlines).filter(([, v]) => v).map(([k, v]) => ({ cohortId: Number(k), deadline: new Date(`${v}Z`).toISOString() })));
  }, [deadlines, setValue]);

  async function onSubmit(values: PracticalData) {
    const r = await send('PUT', `/api/practicals/${p.id}`, values);
    setMsg(r.ok ? { ok: true, text: 'Practical saved.' } : { ok: false, text: r.data.error ?? 'Not saved.' });
    if (r.ok) onSaved();
  }
  const err = formState.errors;
  return (
    <section aria-labelledby="details" className="card">
      <h2 id="details" className="mb-3">Definition</h2>
      <form onSubmit={handleSubmit(onSubmit)} noValidate className="space-y-4">
        <div className="grid gap-3 md:grid-cols-2">
          <div>
            <label htmlFor="p-title" className="label">Title</label>
            <input id="p-title" className="field" {...register('title')} />
            {err.title && <p className="error-text">{err.title.message}</p>}
          </div>
          <div>
            <label htmlFor="p-species" className="label">Isotopologues</label>
            <input id="p-species" className="field" value={speciesText} onChange={(e) => setSpeciesText(e.target.value)} aria-describedby="p-species-hint" />
            <p id="p-species-hint" className="hint">One or several, comma-separated: H35Cl, D35Cl, 12C16O …</p>
            {err.species && <p className="error-text">{err.species.message ?? (err.species as unknown as { message?: string }[]).find?.((x) => x?.message)?.message}</p>}
          </div>
        </div>
        <div className="grid gap-3 md:grid-cols-5">
          <div>
            <label htmlFor="p-mode" className="label">Mode</label>
            <select id="p-mode" className="field" {...register('mode')}>
              <option value="practice">Practice: verdicts before the deadline</option>
              <option value="assessed">Assessed: verdicts only on release</option>
            </select>
          </div>
          <div>
            <label htmlFor="p-attempts" className="label">Maximum attempts</label>
            <input id="p-attempts" type="number" min={1} max={20} className="field num" {...register('maxAttempts', { valueAsNumber: true })} />
            {err.maxAttempts && <p className="error-text">{err.maxAttempts.message}</p>}
          </div>
          <div>
            <label htmlFor="p-late" className="label">Late submissions</label>
            <select id="p-late" className="field" {...register('lateRule')}>
              <option value="penalty">Accepted with a penalty</option>
              <option value="not-accepted">Not accepted</option>
              <option value="none">Accepted, no penalty</option>
            </select>
          </div>
          <div>
            <label htmlFor="p-perday" className="label">Penalty per day (%)</label>
            <input id="p-perday" type="number" step="any" className="field num" disabled={lateRule !== 'penalty'} {...register('latePenaltyPerDay', { valueAsNumber: true })} />
          </div>
          <div>
            <label htmlFor="p-cap" className="label">Penalty cap (%)</label>
            <input id="p-cap" type="number" step="any" className="field num" disabled={lateRule !== 'penalty'} {...register('latePenaltyCap', { valueAsNumber: true })} />
            {err.latePenaltyCap && <p className="error-text">{err.latePenaltyCap.message}</p>}
          </div>
        </div>
        <fieldset>
          <legend className="label">Deadlines per cohort (UTC; leave empty if the cohort does not do this practical)</legend>
          <div className="grid gap-3 md:grid-cols-3">
            {detail.cohorts.filter((c) => !c.archived || deadlines[c.id]).map((c) => (
              <div key={c.id}>
                <label htmlFor={`deadline-${c.id}`} className="text-sm">{c.name} ({c.term})</label>
                <input id={`deadline-${c.id}`} type="datetime-local" className="field num" value={deadlines[c.id] ?? ''} onChange={(e) => setDeadlines({ ...deadlines, [c.id]: e.target.value })} />
              </div>
            ))}
          </div>
        </fieldset>
        <div className="grid gap-3 md:grid-cols-2">
          <div>
            <label htmlFor="p-instructions" className="label">Instructions (Markdown, formulas in $…$ or $$…$$)</label>
            <textarea id="p-instructions" rows={10} className="field font-mono text-sm" {...register('instructions')} />
          </div>
          <div>
            <p className="label" id="instructions-preview-label">As students will see them</p>
            <div aria-labelledby="instructions-preview-label" className="prose max-w-none rounded border border-rule bg-paper p-3 text-sm" dangerouslySetInnerHTML={{ __html: html }} />
          </div>
        </div>
        <div className="grid gap-3 md:grid-cols-2">
          <div>
            <label htmlFor="p-hazards" className="label">Hazard notes (your department&apos;s words)</label>
            <textarea id="p-hazards" rows={4} className="field" {...register('hazardNotes')} />
          </div>
          <HazardNotes notes={hazard} headingLevel={3} />
        </div>
        <fieldset>
          <legend className="label">Hand-marked items</legend>
          {rubric.fields.map((f, i) => (
            <div key={f.id} className="mb-2 grid gap-2 md:grid-cols-[1fr_6rem_1fr_auto] md:items-end">
              <div>
                <label htmlFor={`rubric-${i}-title`} className="text-sm">Item</label>
                <input id={`rubric-${i}-title`} className="field" {...register(`rubric.${i}.title`)} />
              </div>
              <div>
                <label htmlFor={`rubric-${i}-marks`} className="text-sm">Marks</label>
                <input id={`rubric-${i}-marks`} type="number" step="any" className="field num" {...register(`rubric.${i}.marks`, { valueAsNumber: true })} />
              </div>
              <div>
                <label htmlFor={`rubric-${i}-guidance`} className="text-sm">Guidance for markers</label>
                <input id={`rubric-${i}-guidance`} className="field" {...register(`rubric.${i}.guidance`)} />
              </div>
              <button type="button" className="btn-quiet" onClick={() => rubric.remove(i)}>Remove</button>
            </div>
          ))}
          <button type="button" className="btn-quiet" onClick={() => rubric.append({ key: `item-${Date.now().toString(36)}`, title: '', marks: 1, guidance: '' })}>Add hand-marked item</button>
        </fieldset>
        <button type="submit" className="btn" disabled={formState.isSubmitting}>Save definition</button>
        <Status message={msg} />
      </form>
    </section>
  );
}

function Quantities({ detail, onChange }: { detail: Detail; onChange: () => void }) {
  const [msg, setMsg] = useState<Msg>(null);
  const { register, handleSubmit, formState, watch, setValue, reset } = useForm<QuantityInput>({
    resolver: zodResolver(quantitySchema),
    defaultValues: { key: 'bandCentre', species: detail.practical.species[0], unit: 'cm⁻¹', marks: 1, uncertaintyRequired: false, referenceKind: 'literature', referenceValue: null, referenceNote: '' },
  });
  const key = watch('key') as QuantityKey;
  const kind = watch('referenceKind');
  useEffect(() => setValue('unit', QUANTITIES[key]?.displayUnit ?? ''), [key, setValue]);
  async function onAdd(values: QuantityInput) {
    const r = await send('POST', `/api/practicals/${detail.practical.id}/quantities`, values);
    setMsg(r.ok ? { ok: true, text: `${QUANTITIES[values.key as QuantityKey].label} for ${values.species} added.` } : { ok: false, text: r.data.error ?? 'Not added.' });
    if (r.ok) {
      reset({ ...values, referenceValue: null, referenceNote: '' });
      onChange();
    }
  }
  async function remove(q: Quantity) {
    if (!window.confirm(`Remove ${q.label} for ${q.species} and its bands?`)) return;
    const r = await send('DELETE', `/api/practicals/${detail.practical.id}/quantities/${q.id}`);
    setMsg(r.ok ? { ok: true, text: 'Quantity removed.' } : { ok: false, text: r.data.error ?? 'Not removed.' });
    if (r.ok) onChange();
  }
  return (
    <section aria-labelledby="quantities" className="card">
      <h2 id="quantities" className="mb-3">Quantities students report</h2>
      <table className="data-table stack-table" aria-label="Quantities">
        <thead><tr><th>Quantity</th><th>Isotopologue</th><th>Unit</th><th className="num">Marks</th><th>Uncertainty</th><th>Reference value</th><th>Bands</th><th><span className="sr-only">Actions</span></th></tr></thead>
        <tbody>
          {detail.quantities.map((q) => (
            <tr key={q.id}>
              <td data-label=""><strong className="sm:font-normal">{q.label}</strong></td>
              <td data-label="Isotopologue">{q.species}</td>
              <td className="nowrap" data-label="Unit">{q.unitDisplay}</td>
              <td className="num" data-label="Marks">{q.marks}</td>
              <td data-label="Uncertainty">{q.uncertaintyRequired ? 'required' : 'optional'}</td>
              <td data-label="Reference">
                {q.reference ? <div><span className="num nowrap">{+q.reference.value.toPrecision(7)} {q.reference.unit}</span><br /><span className="hint">{q.reference.kind === 'department' ? 'Department value: ' : 'Literature: '}{publishedSource(q.reference.source)}</span></div> : '—'}
              </td>
              <td className="text-sm" data-label="Bands"><div>{q.bands.map((b) => <div key={b.id}>{b.basis}, {cohortLabel(detail.cohorts, b.cohortId)}: {b.text}</div>)}{q.bands.length === 0 && <span className="text-ink-soft">none yet</span>}</div></td>
              <td data-label=""><button type="button" className="btn-quiet" onClick={() => remove(q)}>Remove<span className="sr-only"> {q.label} {q.species}</span></button></td>
            </tr>
          ))}
          {detail.quantities.length === 0 && <tr><td colSpan={8} className="text-ink-soft">No quantities yet.</td></tr>}
        </tbody>
      </table>
      <h3 className="mb-2 mt-4">Add a quantity</h3>
      <form onSubmit={handleSubmit(onAdd)} noValidate className="grid gap-3 md:grid-cols-4">
        <div>
          <label htmlFor="q-key" className="label">Quantity</label>
          <select id="q-key" className="field" {...register('key')}>
            {QUANTITY_KEYS.map((k) => <option key={k} value={k}>{QUANTITIES[k].label}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="q-species" className="label">Isotopologue</label>
          <select id="q-species" className="field" {...register('species')}>
            {detail.practical.species.map((s) => <option key={s} value={s}>{s}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="q-unit" className="label">Expected unit</label>
          <input id="q-unit" className="field" {...register('unit')} />
        </div>
        <div>
          <label htmlFor="q-marks" className="label">Marks</label>
          <input id="q-marks" type="number" step="any" className="field num" {...register('marks', { valueAsNumber: true })} />
          {formState.errors.marks && <p className="error-text">{formState.errors.marks.message}</p>}
        </div>
        <div className="flex items-center gap-2">
          <input id="q-unc" type="checkbox" {...register('uncertaintyRequired')} />
          <label htmlFor="q-unc">Uncertainty required</label>
        </div>
        <div>
          <label htmlFor="q-refkind" className="label">Reference value</label>
          <select id="q-refkind" className="field" {...register('referenceKind')}>
            <option value="literature">Literature (published value)</option>
            <option value="department">Department value</option>
          </select>
        </div>
        {kind === 'department' && (
          <>
            <div>
              <label htmlFor="q-refvalue" className="label">Department value (in the expected unit)</label>
              <input id="q-refvalue" type="number" step="any" className="field num" {...register('referenceValue', { setValueAs: (v) => (v === '' || v == null ? null : Number(v)) })} />
              {formState.errors.referenceValue && <p className="error-text">{formState.errors.referenceValue.message}</p>}
            </div>
            <div>
              <label htmlFor="q-refnote" className="label">Where it comes from</label>
              <input id="q-refnote" className="field" placeholder="Demonstrator run on bench 2, Oct 2026" {...register('referenceNote')} />
            </div>
          </>
        )}
        <div className="md:col-span-4"><button type="submit" className="btn" disabled={formState.isSubmitting}>Add quantity</button></div>
      </form>
      <Status message={msg} />
    </section>
  );
}

function Bands({ detail, onChange }: { detail: Detail; onChange: () => void }) {
  const [msg, setMsg] = useState<Msg>(null);
  const [f, setF] = useState({ quantityId: '', scope: 'course', basis: 'accuracy', kind: 'absolute', inner: '', outer: '', unit: '' });
  const [pending, setPending] = useState<{ body: Record<string, unknown>; count: number; method: 'PUT' | 'DELETE' } | null>(null);
  const quantity = detail.quantities.find((q) => String(q.id) === f.quantityId);
  useEffect(() => {
    if (quantity && f.kind === 'absolute' && !f.unit) setF((x) => ({ ...x, unit: quantity.unit }));
  }, [quantity, f.kind, f.unit]);
  const scale = f.kind === 'relative' ? 0.01 : 1;
  async function submit(method: 'PUT' | 'DELETE', body: Record<string, unknown>) {
    const r = await send<{ submissions?: number; rechecked?: number | null }>(method, `/api/practicals/${detail.practical.id}/bands`, body);
    if (r.status === 409 && r.data.submissions) return setPending({ body, count: r.data.submissions, method });
    setPending(null);
    if (!r.ok) return setMsg({ ok: false, text: r.data.error ?? 'Not saved.' });
    setMsg({ ok: true, text: `${method === 'PUT' ? 'Band saved' : 'Band removed'}${typeof r.data.rechecked === 'number' ? `; ${r.data.rechecked} submission(s) re-checked` : ''}.` });
    onChange();
  }
  function save() {
    submit('PUT', {
      quantityDefinitionId: Number(f.quantityId), cohortId: f.scope === 'course' ? null : Number(f.scope), basis: f.basis, kind: f.kind,
      inner: Number(f.inner) * scale, outer: f.outer === '' ? null : Number(f.outer) * scale, unit: f.kind === 'absolute' ? f.unit : null,
    });
  }
  const set = (k: keyof typeof f) => (e: React.ChangeEvent<HTMLInputElement | HTMLSelectElement>) => setF({ ...f, [k]: e.target.value });
  return (
    <section aria-labelledby="bands" className="card">
      <h2 id="bands" className="mb-1">Tolerance bands</h2>
      <p className="hint mb-3">Consistency: is the number right from the student&apos;s own data? Accuracy: is the measurement close to the reference value? A cohort&apos;s own band replaces the course default for that cohort. Inner band: full marks; outer band: partial credit.</p>
      <div className="grid gap-3 md:grid-cols-4">
        <div>
          <label htmlFor="b-quantity" className="label">Quantity</label>
          <select id="b-quantity" className="field" value={f.quantityId} onChange={set('quantityId')}>
            <option value="">Choose…</option>
            {detail.quantities.map((q) => <option key={q.id} value={q.id}>{q.label} · {q.species}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="b-scope" className="label">Applies to</label>
          <select id="b-scope" className="field" value={f.scope} onChange={set('scope')}>
            <option value="course">Course default (all cohorts)</option>
            {detail.cohorts.filter((c) => !c.archived).map((c) => <option key={c.id} value={c.id}>Only {c.name} ({c.term})</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="b-basis" className="label">Question</label>
          <select id="b-basis" className="field" value={f.basis} onChange={set('basis')}>
            <option value="consistency">Consistency</option>
            <option value="accuracy">Accuracy</option>
          </select>
        </div>
        <div>
          <label htmlFor="b-kind" className="label">Kind</label>
          <select id="b-kind" className="field" value={f.kind} onChange={set('kind')}>
            <option value="absolute">Absolute (± in a unit)</option>
            <option value="relative">Relative (± %)</option>
            <option value="sigma">Standard uncertainties (± n σ)</option>
          </select>
        </div>
        <div>
          <label htmlFor="b-inner" className="label">Inner band {f.kind === 'relative' ? '(%)' : f.kind === 'sigma' ? '(σ)' : ''}</label>
          <input id="b-inner" type="number" step="any" className="field num" value={f.inner} onChange={set('inner')} />
        </div>
        <div>
          <label htmlFor="b-outer" className="label">Outer band, optional {f.kind === 'relative' ? '(%)' : f.kind === 'sigma' ? '(σ)' : ''}</label>
          <input id="b-outer" type="number" step="any" className="field num" value={f.outer} onChange={set('outer')} />
        </div>
        {f.kind === 'absolute' && (
          <div>
            <label htmlFor="b-unit" className="label">Unit</label>
            <input id="b-unit" className="field" value={f.unit} onChange={set('unit')} />
          </div>
        )}
      </div>
      <button type="button" className="btn mt-3" disabled={!f.quantityId || !f.inner} onClick={save}>Save band</button>
      {pending && (
        <div role="alertdialog" aria-labelledby="recheck-q" className="mt-3 rounded border-2 border-verdict-partial bg-verdict-partial-bg p-3">
          <p id="recheck-q" className="font-bold text-verdict-partial">{pending.count} submission(s) were already checked with the current band. Re-check them with the new one?</p>
          <div className="mt-2 flex flex-wrap gap-2">
            <button type="button" className="btn" onClick={() => submit(pending.method, { ...pending.body, recheck: true })}>Save and re-check</button>
            <button type="button" className="btn-quiet" onClick={() => submit(pending.method, { ...pending.body, recheck: false })}>Save, keep existing results</button>
            <button type="button" className="btn-quiet" onClick={() => setPending(null)}>Cancel</button>
          </div>
        </div>
      )}
      <Status message={msg} />
      <h3 className="mb-2 mt-4">Bands set</h3>
      <table className="data-table stack-table" aria-label="Tolerance bands">
        <thead><tr><th>Quantity</th><th>Applies to</th><th>Question</th><th>Band</th><th><span className="sr-only">Actions</span></th></tr></thead>
        <tbody>
          {detail.quantities.flatMap((q) => [
            ...q.bands.map((b) => (
              <tr key={b.id}>
                <td data-label=""><strong className="sm:font-normal">{q.label} · {q.species}</strong></td>
                <td data-label="Applies to">{cohortLabel(detail.cohorts, b.cohortId)}</td>
                <td data-label="Question">{b.basis}</td>
                <td className="num" data-label="Band">{b.text}</td>
                <td data-label=""><button type="button" className="btn-quiet" onClick={() => submit('DELETE', { bandId: b.id })}>Remove<span className="sr-only"> band {b.text} of {q.label}</span></button></td>
              </tr>
            )),
            ...(q.consistencyDefault && !q.bands.some((b) => b.basis === 'consistency' && b.cohortId === null)
              ? [
                  <tr key={`default-${q.id}`} data-testid="consistency-default">
                    <td data-label=""><strong className="sm:font-normal">{q.label} · {q.species}</strong></td>
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
    </section>
  );
}

type PreviewResult = {
  reference: { value: number; unit: string; source: string; kind: string } | null;
  results: { basis: string; verdict: Verdict; marks: number; maxMarks: number; band: string | null; bandFrom: string | null; deviation: number | null; reason?: string; expected: number | null }[];
};

function LivePreview({ detail }: { detail: Detail }) {
  const [f, setF] = useState({ quantityId: '', cohort: 'course', value: '', unit: '', uncertainty: '', recomputed: '' });
  const [result, setResult] = useState<PreviewResult | null>(null);
  const [msg, setMsg] = useState<string | null>(null);
  const quantity = detail.quantities.find((q) => String(q.id) === f.quantityId);
  useEffect(() => {
    if (!quantity || f.value === '' || Number.isNaN(Number(f.value))) return setResult(null);
    const t = setTimeout(async () => {
      const r = await send<PreviewResult>('POST', `/api/practicals/${detail.practical.id}/preview`, {
        quantityDefinitionId: quantity.id, cohortId: f.cohort === 'course' ? null : Number(f.cohort), value: Number(f.value), unit: f.unit || quantity.unit,
        uncertainty: f.uncertainty ? Number(f.uncertainty) : null, recomputed: f.recomputed ? Number(f.recomputed) : null,
      });
      if (r.ok) {
        setResult(r.data);
        setMsg(null);
      } else {
        setResult(null);
        setMsg(r.data.error ?? 'No preview.');
      }
    }, 300);
    return () => clearTimeout(t);
  }, [f, quantity, detail]);
  const set = (k: keyof typeof f) => (e: React.ChangeEvent<HTMLInputElement | HTMLSelectElement>) => setF({ ...f, [k]: e.target.value });
  return (
    <section aria-labelledby="live-preview" className="card">
      <h2 id="live-preview" className="mb-1">Try a value</h2>
      <p className="hint mb-3">Type a value a student might report and see the verdict and marks it would get in a cohort. Nothing is saved.</p>
      <div className="grid gap-3 md:grid-cols-6">
        <div className="md:col-span-2">
          <label htmlFor="pv-quantity" className="label">Quantity</label>
          <select id="pv-quantity" className="field" value={f.quantityId} onChange={set('quantityId')}>
            <option value="">Choose…</option>
            {detail.quantities.map((q) => <option key={q.id} value={q.id}>{q.label} · {q.species}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="pv-cohort" className="label">Cohort</label>
          <select id="pv-cohort" className="field" value={f.cohort} onChange={set('cohort')}>
            <option value="course">Course default</option>
            {detail.cohorts.filter((c) => !c.archived).map((c) => <option key={c.id} value={c.id}>{c.name} ({c.term})</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="pv-value" className="label">Reported value</label>
          <input id="pv-value" type="number" step="any" className="field num" value={f.value} onChange={set('value')} />
        </div>
        <div>
          <label htmlFor="pv-unit" className="label">Unit</label>
          <input id="pv-unit" className="field" placeholder={quantity?.unit} value={f.unit} onChange={set('unit')} />
        </div>
        <div>
          <label htmlFor="pv-recomputed" className="label">Recomputed from their data (optional)</label>
          <input id="pv-recomputed" type="number" step="any" className="field num" value={f.recomputed} onChange={set('recomputed')} />
        </div>
      </div>
      <div aria-live="polite" className="mt-3">
        {msg && <p className="error-text">{msg}</p>}
        {result && (
          <div>
            {result.reference && <p className="text-sm">Reference: <span className="num">{+result.reference.value.toPrecision(7)}</span> {result.reference.unit} ({result.reference.kind === 'department' ? 'department value' : 'literature'}: {publishedSource(result.reference.source)})</p>}
            <table className="data-table stack-table mt-2" aria-label="Preview verdicts">
              <thead><tr><th>Question</th><th>Verdict</th><th className="num">Marks</th><th>Band</th><th className="num">Deviation</th></tr></thead>
              <tbody>
                {result.results.map((r) => (
                  <tr key={r.basis}>
                    <td data-label=""><strong className="sm:font-normal">{r.basis}</strong></td>
                    <td data-label="Verdict"><div><VerdictLabel verdict={r.verdict} />{r.reason && <span className="hint block">{r.reason}</span>}</div></td>
                    <td className="num" data-label="Marks">{+r.marks.toFixed(2)} / {+r.maxMarks.toFixed(2)}</td>
                    <td data-label="Band">{r.band ? `${r.band} (${r.bandFrom === 'cohort' ? 'this cohort' : 'course default'})` : 'none set'}</td>
                    <td className="num nowrap" data-label="Deviation">{r.deviation === null ? '—' : `${r.deviation >= 0 ? '+' : '−'}${+Math.abs(r.deviation).toPrecision(4)} ${quantity?.unitDisplay ?? ''}`}</td>
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

function CopyPractical({ detail, courseId }: { detail: Detail; courseId: number }) {
  const overridden = [...new Set(detail.quantities.flatMap((q) => q.bands.map((b) => b.cohortId)).filter((x): x is number => x !== null))];
  const [title, setTitle] = useState(`${detail.practical.title} (copy)`);
  const [map, setMap] = useState<Record<string, string>>({});
  const [deadlines, setDeadlines] = useState<Record<number, string>>({});
  const [msg, setMsg] = useState<Msg>(null);
  async function copy() {
    const r = await send<{ practical: { id: number } }>('POST', `/api/practicals/${detail.practical.id}/copy`, {
      title,
      cohortMap: Object.fromEntries(overridden.map((id) => [String(id), map[id] ? Number(map[id]) : null])),
      deadlines: Object.entries(deadlines).filter(([, v]) => v).map(([k, v]) => ({ cohortId: Number(k), deadline: new Date(`${v}Z`).toISOString() })),
    });
    if (!r.ok) return setMsg({ ok: false, text: r.data.error ?? 'Not copied.' });
    window.location.assign(`/courses/${courseId}/practicals/${r.data.practical.id}`);
  }
  const open = detail.cohorts.filter((c) => !c.archived);
  return (
    <section aria-labelledby="copy" className="card">
      <h2 id="copy" className="mb-1">Copy to a new term</h2>
      <p className="hint mb-3">Copies the definition, quantities and bands. Cohort bands move to the cohort you choose, or are dropped.</p>
      <label htmlFor="copy-title" className="label">Title of the copy</label>
      <input id="copy-title" className="field mb-3" value={title} onChange={(e) => setTitle(e.target.value)} />
      {overridden.map((id) => (
        <div key={id} className="mb-2">
          <label htmlFor={`copy-map-${id}`} className="text-sm">Bands of {cohortLabel(detail.cohorts, id)} go to</label>
          <select id={`copy-map-${id}`} className="field" value={map[id] ?? ''} onChange={(e) => setMap({ ...map, [id]: e.target.value })}>
            <option value="">Drop them</option>
            {open.map((c) => <option key={c.id} value={c.id}>{c.name} ({c.term})</option>)}
          </select>
        </div>
      ))}
      <fieldset className="mb-3">
        <legend className="label">Deadlines of the copy (UTC)</legend>
        <div className="grid gap-3 md:grid-cols-3">
          {open.map((c) => (
            <div key={c.id}>
              <label htmlFor={`copy-deadline-${c.id}`} className="text-sm">{c.name} ({c.term})</label>
              <input id={`copy-deadline-${c.id}`} type="datetime-local" className="field num" value={deadlines[c.id] ?? ''} onChange={(e) => setDeadlines({ ...deadlines, [c.id]: e.target.value })} />
            </div>
          ))}
        </div>
      </fieldset>
      <button type="button" className="btn" disabled={!title.trim()} onClick={copy}>Copy practical</button>
      <Status message={msg} />
    </section>
  );
}
