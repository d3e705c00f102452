'use client';
/**
 * The student's submission form: per isotopologue a line list (typed, pasted from a spreadsheet
 * or read from a CSV file), the band centre and each required quantity with unit and
 * uncertainty; spectrum and report uploads; autosave of the draft.
 *
 * Nothing costs an attempt until the student confirms: each quantity is checked as it is typed
 * (QuantityInput), "Check without submitting" runs the full format check (and, in practice mode,
 * the verdicts) on the server without writing anything, and Submit first says what will be
 * handed in and how many attempts remain.
 *
 * The steps live beside this file: the draft and its autosave (use-draft.ts), the line lists
 * (line-lists.tsx), checking and submitting (hand-in.tsx).
 */
import { useState } from 'react';
import { useForm, type UseFormReturn } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { draftSchema, type Draft } from '@/lib/schemas/submission';
import type { Dimension } from '@/lib/grading/units';
import type { UploadAccepted } from '@/lib/submissions/uploads';
import { api } from '@/lib/api-client';
import { QuantityInput } from '../quantity-input';
import { SpectrumPanel, type PanelSample } from '../spectrum-panel';
import { useDraft, type DraftHandle, type SaveState } from './use-draft';
import { LineListField, useLineLists, type LineLists } from './line-lists';
import { HandInBar, HandInOutcome, SubmitDialog, useHandIn } from './hand-in';

export interface FormQuantity {
  key: string;
  species: string;
  label: string;
  unit: string;
  unitOptions: string[];
  uncertaintyRequired: boolean;
  dimension: Dimension;
}

interface Props {
  practicalId: number;
  draftId: number | null;
  version: number;
  initialDraft: Draft;
  species: { name: string; display: string }[];
  quantities: FormQuantity[];
  askOvertone: boolean;
  attemptsLeft: number;
  mode: 'practice' | 'assessed';
  uploads: { spectrum: string | null; report: string | null };
  /** The spectra the practical takes, and the names of those uploaded, by sample. */
  samples: PanelSample[];
  spectrumNames: Record<string, string | null>;
  /** Where the practical's bands lie, cm⁻¹: lets the line-list reader recognise wavelengths. */
  expectedRange?: { from: number; to: number };
}

export function SubmissionForm(props: Props) {
  const form = useForm<Draft>({ resolver: zodResolver(draftSchema) as never, defaultValues: props.initialDraft });
  const draft = useDraft(form, props.practicalId, { id: props.draftId, version: props.version });
  const lists = useLineLists(form, props.species, props.initialDraft, props.expectedRange);
  const handIn = useHandIn(form, props.practicalId, draft, props.attemptsLeft);

  return (
    <form
      onSubmit={(e) => {
        e.preventDefault();
        void handIn.check(true);
      }}
      noValidate
      className="space-y-6"
    >
      <SaveStatus state={draft.saveState} error={draft.saveError} />
      {props.species.map((s) => (
        <SpeciesFieldset
          key={s.name}
          form={form}
          species={s}
          quantities={props.quantities.filter((q) => q.species === s.name)}
          askOvertone={props.askOvertone}
          lists={lists}
        />
      ))}
      <FilesFieldset form={form} draft={draft} lists={lists} props={props} />
      <HandInBar handIn={handIn} mode={props.mode} />
      <HandInOutcome handIn={handIn} />
      <SubmitDialog handIn={handIn} />
    </form>
  );
}

function SaveStatus({ state, error }: { state: SaveState; error: string | null }) {
  return (
    <p className="text-sm text-ink-soft" aria-live="polite">
      {state === 'saving' && 'Saving draft…'}
      {state === 'saved' && 'Draft saved.'}
      {state === 'error' && <span className="text-danger">Draft not saved: {error}</span>}
    </p>
  );
}

/** One isotopologue: its line list, band centre (unless asked as a quantity), overtone and quantities. */
function SpeciesFieldset({
  form,
  species: s,
  quantities: qs,
  askOvertone,
  lists,
}: {
  form: UseFormReturn<Draft>;
  species: { name: string; display: string };
  quantities: FormQuantity[];
  askOvertone: boolean;
  lists: LineLists;
}) {
  return (
    <fieldset className="card space-y-4">
      <legend className="px-1 text-lg font-bold">{s.display}</legend>
      <LineListField form={form} sp={s.name} display={s.display} lists={lists} />
      <div className="grid gap-4 md:grid-cols-2">
        {!qs.some((q) => q.key === 'bandCentre') && (
          <QuantityInput
            form={form}
            sp={s.name}
            name="bandCentre"
            label={`Band centre ν̃₀ (${s.display})`}
            options={['cm-1']}
            required={false}
            dimension="wavenumber"
          />
        )}
        {askOvertone && (
          <QuantityInput
            form={form}
            sp={s.name}
            name="overtone"
            path="overtone"
            label={`First overtone band centre (${s.display})`}
            options={['cm-1']}
            required={false}
            dimension="wavenumber"
          />
        )}
        {qs.map((q) => (
          <QuantityInput
            key={q.key}
            form={form}
            sp={s.name}
            name={q.key}
            label={`${q.label} (${s.display})`}
            options={q.unitOptions}
            required={q.uncertaintyRequired}
            dimension={q.dimension}
            defaultUnit={q.unit}
          />
        ))}
      </div>
    </fieldset>
  );
}

/** The spectra (SpectrumPanel) and the report; an upload saves the draft first when it has no row yet. */
function FilesFieldset({ form, draft, lists, props }: { form: UseFormReturn<Draft>; draft: DraftHandle; lists: LineLists; props: Props }) {
  return (
    <fieldset className="card min-w-0 space-y-3">
      <legend className="px-1 text-lg font-bold">Files</legend>
      <SpectrumPanel
        draftId={draft.draftId}
        version={draft.version}
        samples={props.samples}
        uploaded={props.spectrumNames}
        ensureDraft={draft.save}
        onUploaded={(u) => {
          if (u.first) form.setValue('spectrumUploadId', u.id);
          else form.setValue(`spectra.${u.sample}`, u.id);
          draft.setVersion(u.version);
        }}
        onUseLines={(texts) => {
          for (const [sp, text] of Object.entries(texts)) {
            if (props.species.some((x) => x.name === sp)) lists.putText(sp, text);
          }
        }}
      />
      <ReportUpload form={form} draft={draft} initialName={props.uploads.report} />
    </fieldset>
  );
}

function ReportUpload({ form, draft, initialName }: { form: UseFormReturn<Draft>; draft: DraftHandle; initialName: string | null }) {
  const [name, setName] = useState(initialName);
  const [message, setMessage] = useState<string | null>(null);
  const upload = async (file: File | undefined) => {
    if (!file) return;
    setMessage(`Uploading ${file.name}…`);
    const id = draft.draftId ?? (await draft.save());
    if (!id) return;
    const fd = new FormData();
    fd.set('submissionId', String(id));
    fd.set('kind', 'report');
    fd.set('file', file);
    const r = await api.post<UploadAccepted>('/api/uploads', fd);
    if (!r.ok) {
      setMessage(`Not accepted: ${r.error.message}`);
      return;
    }
    form.setValue('reportUploadId', r.data.id);
    draft.setVersion(r.data.version);
    setName(r.data.originalName);
    setMessage(`Uploaded ${r.data.originalName}.${r.data.warnings?.length ? ` ${r.data.warnings.join(' ')}` : ''}`);
  };
  return (
    <div>
      <label className="label" htmlFor="report-file">
        Report (PDF)
      </label>
      <input id="report-file" type="file" accept=".pdf,application/pdf" onChange={(e) => void upload(e.target.files?.[0])} />
      <p className="hint" aria-live="polite">
        {message ?? (name ? `Current: ${name}` : 'No report uploaded yet.')}
      </p>
    </div>
  );
}
