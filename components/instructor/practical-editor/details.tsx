'use client';
/** The practical's definition: title, isotopologues, mode, attempts, late rule, deadlines, instructions, hazards, hand-marked items. */
import { useEffect, useState } from 'react';
import { useForm, useFieldArray, useWatch, type UseFormReturn } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { practicalSchema, type PracticalData, type PracticalInput } from '@/lib/schemas/instructor';
import { HazardNotes } from '@/components/hazard-notes';
import { Field } from '@/components/ui/field';
import { api } from '@/lib/api-client';
import type { InstructionsPreview } from '@/lib/instructor/markdown';
import { fromLocal, Status, toLocal, type Detail, type Msg } from './shared';

export function Details({ detail, onSaved }: { detail: Detail; onSaved: () => void }) {
  const p = detail.practical;
  const [msg, setMsg] = useState<Msg>(null);
  const [speciesText, setSpeciesText] = useState(p.species.join(', '));
  const [html, setHtml] = useState(detail.instructionsHtml);
  const [deadlines, setDeadlines] = useState<Record<number, string>>(
    Object.fromEntries(detail.deadlines.map((d) => [d.cohortId, toLocal(d.deadline)])),
  );
  const form = useForm<PracticalInput, unknown, PracticalData>({
    resolver: zodResolver(practicalSchema),
    defaultValues: { ...p, deadlines: detail.deadlines },
  });
  const { register, handleSubmit, formState, setValue, control } = form;
  const instructions = useWatch({ control, name: 'instructions' }) ?? '';
  const hazard = useWatch({ control, name: 'hazardNotes' }) ?? '';
  useEffect(() => {
    const t = setTimeout(async () => {
      const r = await api.post<InstructionsPreview>('/api/practicals/markdown', { markdown: instructions });
      if (r.ok) setHtml(r.data.html);
    }, 400);
    return () => clearTimeout(t);
  }, [instructions]);
  useEffect(() => {
    setValue('species', speciesText.split(/[,;\s]+/).filter(Boolean));
  }, [speciesText, setValue]);
  useEffect(() => {
    setValue(
      'deadlines',
      Object.entries(deadlines)
        .filter(([, v]) => v)
        .map(([k, v]) => ({ cohortId: Number(k), deadline: fromLocal(v) })),
    );
  }, [deadlines, setValue]);

  async function onSubmit(values: PracticalData) {
    const r = await api.put(`/api/practicals/${p.id}`, values);
    setMsg(r.ok ? { ok: true, text: 'Practical saved.' } : { ok: false, text: r.error.message });
    if (r.ok) onSaved();
  }
  const err = formState.errors;
  const speciesError =
    err.species?.message ?? (err.species as unknown as { message?: string }[] | undefined)?.find?.((x) => x?.message)?.message;
  return (
    <section aria-labelledby="details" className="card">
      <h2 id="details" className="mb-3">
        Definition
      </h2>
      <form onSubmit={handleSubmit(onSubmit)} noValidate className="space-y-4">
        <div className="grid gap-3 md:grid-cols-2">
          <Field id="p-title" label="Title" error={err.title?.message}>
            <input className="field" {...register('title')} />
          </Field>
          <Field id="p-species" label="Isotopologues" hint="One or several, comma-separated: H35Cl, D35Cl, 12C16O …" error={speciesError}>
            <input className="field" value={speciesText} onChange={(e) => setSpeciesText(e.target.value)} />
          </Field>
        </div>
        <RuleFields form={form} />
        <DeadlineFields cohorts={detail.cohorts} deadlines={deadlines} setDeadlines={setDeadlines} />
        <div className="grid gap-3 md:grid-cols-2">
          <Field id="p-instructions" label="Instructions (Markdown, formulas in $…$ or $$…$$)">
            <textarea rows={10} className="field font-mono text-sm" {...register('instructions')} />
          </Field>
          <div>
            <p className="label" id="instructions-preview-label">
              As students will see them
            </p>
            {/* Sanitised by renderInstructions on the server (lib/instructor/markdown.ts). */}
            <div
              aria-labelledby="instructions-preview-label"
              className="prose max-w-none rounded border border-rule bg-paper p-3 text-sm"
              dangerouslySetInnerHTML={{ __html: html }}
            />
          </div>
        </div>
        <div className="grid gap-3 md:grid-cols-2">
          <Field id="p-hazards" label="Hazard notes (your department's words)">
            <textarea rows={4} className="field" {...register('hazardNotes')} />
          </Field>
          <HazardNotes notes={hazard} headingLevel={3} />
        </div>
        <RubricFields form={form} />
        <button type="submit" className="btn" disabled={formState.isSubmitting}>
          Save definition
        </button>
        <Status message={msg} />
      </form>
    </section>
  );
}

type DetailsForm = UseFormReturn<PracticalInput, unknown, PracticalData>;

/** Mode, attempts and what happens to a late submission. */
function RuleFields({ form }: { form: DetailsForm }) {
  const { register, formState, control } = form;
  const err = formState.errors;
  const penalty = useWatch({ control, name: 'lateRule' }) === 'penalty';
  return (
    <div className="grid gap-3 md:grid-cols-5">
      <Field id="p-mode" label="Mode">
        <select className="field" {...register('mode')}>
          <option value="practice">Practice: verdicts before the deadline</option>
          <option value="assessed">Assessed: verdicts only on release</option>
        </select>
      </Field>
      <Field id="p-attempts" label="Maximum attempts" error={err.maxAttempts?.message}>
        <input type="number" min={1} max={20} className="field num" {...register('maxAttempts', { valueAsNumber: true })} />
      </Field>
      <Field id="p-late" label="Late submissions">
        <select className="field" {...register('lateRule')}>
          <option value="penalty">Accepted with a penalty</option>
          <option value="not-accepted">Not accepted</option>
          <option value="none">Accepted, no penalty</option>
        </select>
      </Field>
      <Field id="p-perday" label="Penalty per day (%)">
        <input
          type="number"
          step="any"
          className="field num"
          disabled={!penalty}
          {...register('latePenaltyPerDay', { valueAsNumber: true })}
        />
      </Field>
      <Field id="p-cap" label="Penalty cap (%)" error={err.latePenaltyCap?.message}>
        <input
          type="number"
          step="any"
          className="field num"
          disabled={!penalty}
          {...register('latePenaltyCap', { valueAsNumber: true })}
        />
      </Field>
    </div>
  );
}

function DeadlineFields({
  cohorts,
  deadlines,
  setDeadlines,
}: {
  cohorts: Detail['cohorts'];
  deadlines: Record<number, string>;
  setDeadlines: (d: Record<number, string>) => void;
}) {
  return (
    <fieldset>
      <legend className="label">Deadlines per cohort (UTC; leave empty if the cohort does not do this practical)</legend>
      <div className="grid gap-3 md:grid-cols-3">
        {cohorts
          .filter((c) => !c.archived || deadlines[c.id])
          .map((c) => (
            <Field key={c.id} id={`deadline-${c.id}`} label={`${c.name} (${c.term})`} labelClassName="text-sm">
              <input
                type="datetime-local"
                className="field num"
                value={deadlines[c.id] ?? ''}
                onChange={(e) => setDeadlines({ ...deadlines, [c.id]: e.target.value })}
              />
            </Field>
          ))}
      </div>
    </fieldset>
  );
}

/** Items a marker marks by hand, with their marks and guidance. */
function RubricFields({ form }: { form: DetailsForm }) {
  const { register, control } = form;
  const rubric = useFieldArray({ control, name: 'rubric' });
  return (
    <fieldset>
      <legend className="label">Hand-marked items</legend>
      {rubric.fields.map((f, i) => (
        <div key={f.id} className="mb-2 grid gap-2 md:grid-cols-[1fr_6rem_1fr_auto] md:items-end">
          <Field id={`rubric-${i}-title`} label="Item" labelClassName="text-sm">
            <input className="field" {...register(`rubric.${i}.title`)} />
          </Field>
          <Field id={`rubric-${i}-marks`} label="Marks" labelClassName="text-sm">
            <input type="number" step="any" className="field num" {...register(`rubric.${i}.marks`, { valueAsNumber: true })} />
          </Field>
          <Field id={`rubric-${i}-guidance`} label="Guidance for markers" labelClassName="text-sm">
            <input className="field" {...register(`rubric.${i}.guidance`)} />
          </Field>
          <button type="button" className="btn-quiet" onClick={() => rubric.remove(i)}>
            Remove
          </button>
        </div>
      ))}
      <button
        type="button"
        className="btn-quiet"
        onClick={() => rubric.append({ key: `item-${Date.now().toString(36)}`, title: '', marks: 1, guidance: '' })}
      >
        Add hand-marked item
      </button>
    </fieldset>
  );
}
