'use client';
/** The quantities students report, with their references and bands, and the form that adds one. */
import { useEffect, useState } from 'react';
import { useForm, useWatch } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { QUANTITIES, QUANTITY_KEYS, type QuantityKey } from '@/lib/grading/quantities';
import { quantitySchema, type QuantityInput } from '@/lib/schemas/instructor';
import { publishedSource } from '@/lib/display';
import { api } from '@/lib/api-client';
import { cohortLabel, Status, type Detail, type Msg, type Quantity } from './shared';
import { Field } from '@/components/ui/field';

export function Quantities({ detail, onChange }: { detail: Detail; onChange: () => void }) {
  const [msg, setMsg] = useState<Msg>(null);
  async function remove(q: Quantity) {
    if (!window.confirm(`Remove ${q.label} for ${q.species} and its bands?`)) return;
    const r = await api.delete(`/api/practicals/${detail.practical.id}/quantities/${q.id}`);
    setMsg(r.ok ? { ok: true, text: 'Quantity removed.' } : { ok: false, text: r.error.message });
    if (r.ok) onChange();
  }
  return (
    <section aria-labelledby="quantities" className="card">
      <h2 id="quantities" className="mb-3">
        Quantities students report
      </h2>
      <QuantitiesTable detail={detail} onRemove={remove} />
      <h3 className="mb-2 mt-4">Add a quantity</h3>
      <AddQuantity detail={detail} onAdded={onChange} setMsg={setMsg} />
      <Status message={msg} />
    </section>
  );
}

function QuantitiesTable({ detail, onRemove }: { detail: Detail; onRemove: (q: Quantity) => void }) {
  return (
    <table className="data-table stack-table" aria-label="Quantities">
      <thead>
        <tr>
          <th>Quantity</th>
          <th>Isotopologue</th>
          <th>Unit</th>
          <th className="num">Marks</th>
          <th>Uncertainty</th>
          <th>Reference value</th>
          <th>Bands</th>
          <th>
            <span className="sr-only">Actions</span>
          </th>
        </tr>
      </thead>
      <tbody>
        {detail.quantities.map((q) => (
          <tr key={q.id}>
            <td data-label="">
              <strong className="sm:font-normal">{q.label}</strong>
            </td>
            <td data-label="Isotopologue">{q.species}</td>
            <td className="nowrap" data-label="Unit">
              {q.unitDisplay}
            </td>
            <td className="num" data-label="Marks">
              {q.marks}
            </td>
            <td data-label="Uncertainty">{q.uncertaintyRequired ? 'required' : 'optional'}</td>
            <td data-label="Reference">
              <ReferenceCell reference={q.reference} />
            </td>
            <td className="text-sm" data-label="Bands">
              <div>
                {q.bands.map((b) => (
                  <div key={b.id}>
                    {b.basis}, {cohortLabel(detail.cohorts, b.cohortId)}: {b.text}
                  </div>
                ))}
                {q.bands.length === 0 && <span className="text-ink-soft">none yet</span>}
              </div>
            </td>
            <td data-label="">
              <button type="button" className="btn-quiet" onClick={() => onRemove(q)}>
                Remove
                <span className="sr-only">
                  {' '}
                  {q.label} {q.species}
                </span>
              </button>
            </td>
          </tr>
        ))}
        {detail.quantities.length === 0 && (
          <tr>
            <td colSpan={8} className="text-ink-soft">
              No quantities yet.
            </td>
          </tr>
        )}
      </tbody>
    </table>
  );
}

function ReferenceCell({ reference }: { reference: Quantity['reference'] }) {
  if (!reference) return '—';
  return (
    <div>
      <span className="num nowrap">
        {+reference.value.toPrecision(7)} {reference.unit}
      </span>
      <br />
      <span className="hint">
        {reference.kind === 'department' ? 'Department value: ' : 'Literature: '}
        {publishedSource(reference.source)}
      </span>
    </div>
  );
}

/** The form that adds a quantity; the expected unit follows the quantity chosen until the instructor types another. */
function AddQuantity({ detail, onAdded, setMsg }: { detail: Detail; onAdded: () => void; setMsg: (m: Msg) => void }) {
  const { register, handleSubmit, formState, setValue, reset, control } = useForm<QuantityInput>({
    resolver: zodResolver(quantitySchema),
    defaultValues: {
      key: 'bandCentre',
      species: detail.practical.species[0],
      unit: 'cm⁻¹',
      marks: 1,
      uncertaintyRequired: false,
      referenceKind: 'literature',
      referenceValue: null,
      referenceNote: '',
    },
  });
  const key = useWatch({ control, name: 'key' }) as QuantityKey;
  const kind = useWatch({ control, name: 'referenceKind' });
  useEffect(() => setValue('unit', QUANTITIES[key]?.displayUnit ?? ''), [key, setValue]);
  async function onAdd(values: QuantityInput) {
    const r = await api.post(`/api/practicals/${detail.practical.id}/quantities`, values);
    setMsg(
      r.ok
        ? { ok: true, text: `${QUANTITIES[values.key as QuantityKey].label} for ${values.species} added.` }
        : { ok: false, text: r.error.message },
    );
    if (r.ok) {
      reset({ ...values, referenceValue: null, referenceNote: '' });
      onAdded();
    }
  }
  return (
    <form onSubmit={handleSubmit(onAdd)} noValidate className="grid gap-3 md:grid-cols-4">
      <Field id="q-key" label="Quantity">
        <select className="field" {...register('key')}>
          {QUANTITY_KEYS.map((k) => (
            <option key={k} value={k}>
              {QUANTITIES[k].label}
            </option>
          ))}
        </select>
      </Field>
      <Field id="q-species" label="Isotopologue">
        <select className="field" {...register('species')}>
          {detail.practical.species.map((s) => (
            <option key={s} value={s}>
              {s}
            </option>
          ))}
        </select>
      </Field>
      <Field id="q-unit" label="Expected unit">
        <input className="field" {...register('unit')} />
      </Field>
      <Field id="q-marks" label="Marks" error={formState.errors.marks?.message}>
        <input type="number" step="any" className="field num" {...register('marks', { valueAsNumber: true })} />
      </Field>
      <div className="flex items-center gap-2">
        <input id="q-unc" type="checkbox" {...register('uncertaintyRequired')} />
        <label htmlFor="q-unc">Uncertainty required</label>
      </div>
      <Field id="q-refkind" label="Reference value">
        <select className="field" {...register('referenceKind')}>
          <option value="literature">Literature (published value)</option>
          <option value="department">Department value</option>
        </select>
      </Field>
      {kind === 'department' && (
        <>
          <Field id="q-refvalue" label="Department value (in the expected unit)" error={formState.errors.referenceValue?.message}>
            <input
              type="number"
              step="any"
              className="field num"
              {...register('referenceValue', { setValueAs: (v) => (v === '' || v == null ? null : Number(v)) })}
            />
          </Field>
          <Field id="q-refnote" label="Where it comes from">
            <input className="field" placeholder="Demonstrator run on bench 2, Oct 2026" {...register('referenceNote')} />
          </Field>
        </>
      )}
      <div className="md:col-span-4">
        <button type="submit" className="btn" disabled={formState.isSubmitting}>
          Add quantity
        </button>
      </div>
    </form>
  );
}
