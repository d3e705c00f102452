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
 */
import { useCallback, useEffect, useRef, useState } from 'react';
import { useRouter } from 'next/navigation';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { draftSchema, type Draft } from '@/lib/schemas/submission';
import { parseLineList, formatLineListCsv, type LineListIssue } from '@/lib/linelist';
import type { Dimension } from '@/lib/grading/units';
import type { StudentAttemptView } from '@/lib/submissions/view';
import type { PrecheckView } from '@/lib/submissions/precheck';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { AttemptResult } from './attempt-result';
import { QuantityInput } from './quantity-input';
import { HandInSummary, PrecheckPanel } from './precheck-panel';
import { SpectrumPanel, type PanelSample } from './spectrum-panel';

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

type SaveState = 'idle' | 'saving' | 'saved' | 'error';

export function SubmissionForm(props: Props) {
  const form = useForm<Draft>({ resolver: zodResolver(draftSchema) as never, defaultValues: props.initialDraft });
  const { register, setValue, getValues, watch } = form;
  const [draftId, setDraftId] = useState(props.draftId);
  const versionRef = useRef(props.version);
  const [version, setVersion] = useState(props.version);
  const [saveState, setSaveState] = useState<SaveState>('idle');
  const [saveError, setSaveError] = useState<string | null>(null);
  const [issues, setIssues] = useState<Record<string, { warnings: LineListIssue[]; errors: LineListIssue[] }>>({});
  const [proposals, setProposals] = useState<Record<string, { text: string; count: number; unassigned: number; problems: string[] } | null>>({});
  const [uploadNames, setUploadNames] = useState(props.uploads);
  const [uploadMsg, setUploadMsg] = useState<Record<string, string>>({});
  const [submitting, setSubmitting] = useState(false);
  const [submitError, setSubmitError] = useState<string | null>(null);
  const [result, setResult] = useState<StudentAttemptView | null>(null);
  const [attemptsLeft, setAttemptsLeft] = useState(props.attemptsLeft);
  const [precheck, setPrecheck] = useState<PrecheckView | null>(null);
  const [checking, setChecking] = useState(false);
  const [confirming, setConfirming] = useState<PrecheckView | null>(null);
  const router = useRouter();
  const inFlight = useRef<Promise<unknown> | null>(null);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);

  const save = useCallback(async () => {
    setSaveState('saving');
    const run = (async () => {
      const res = await fetch('/api/submissions/draft', {
        method: 'PUT',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ practicalId: props.practicalId, draft: getValues() }),
      });
      const body = await res.json();
      if (!res.ok) {
        setSaveState('error');
        setSaveError(body.error ?? 'The draft could not be saved.');
        return null;
      }
      setDraftId(body.id);
      versionRef.current = body.version;
      setVersion(body.version);
      setSaveState('saved');
      setSaveError(null);
      return body.id as number;
    })();
    inFlight.current = run;
    try {
      return await run;
    } finally {
      if (inFlight.current === run) inFlight.current = null;
    }
  }, [getValues, props.practicalId]);

  // Autosave: a second and a half after the last change.
  useEffect(() => {
    const sub = watch(() => {
      if (timer.current) clearTimeout(timer.current);
      timer.current = setTimeout(() => void save(), 1500);
    });
    return () => {
      sub.unsubscribe();
      if (timer.current) clearTimeout(timer.current);
    };
  }, [watch, save]);

  const readLines = (sp: string, text: string) => {
    const parsed = parseLineList(text, { expected: props.expectedRange });
    setIssues((m) => ({ ...m, [sp]: { warnings: parsed.warnings, errors: parsed.errors } }));
    setValue(`species.${sp}.lines`, parsed.lines.map((l) => ({ branch: l.branch ?? null, J: l.J ?? null, wavenumber: l.wavenumber })), { shouldDirty: true });
  };

  useEffect(() => {
    for (const s of props.species) {
      const t = props.initialDraft.species[s.name]?.lineText;
      if (t) readLines(s.name, t);
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, []);

  const propose = async (sp: string) => {
    const lines = getValues(`species.${sp}.lines`) ?? [];
    // Loaded when asked for: the assignment brings the band fit and its statistics with it.
    const { assignPeaks } = await import('@/lib/grading/assign');
    const r = assignPeaks(lines.map((l) => l.wavenumber), sp);
    setProposals((m) => ({
      ...m,
      [sp]: { text: formatLineListCsv(r.assignments.map((a) => ({ branch: a.branch, J: a.J, wavenumber: a.wavenumber }))), count: r.assignments.length, unassigned: r.unassigned.length, problems: r.problems.map((p) => p.message) },
    }));
  };

  const acceptProposal = (sp: string) => {
    const p = proposals[sp];
    if (!p) return;
    setValue(`species.${sp}.lineText`, p.text, { shouldDirty: true });
    readLines(sp, p.text);
    setProposals((m) => ({ ...m, [sp]: null }));
  };

  const uploadFile = async (kind: 'report', file: File | undefined) => {
    if (!file) return;
    setUploadMsg((m) => ({ ...m, [kind]: `Uploading ${file.name}…` }));
    const id = draftId ?? (await save());
    if (!id) return;
    const fd = new FormData();
    fd.set('submissionId', String(id));
    fd.set('kind', kind);
    fd.set('file', file);
    const res = await fetch('/api/uploads', { method: 'POST', body: fd });
    const body = await res.json();
    if (!res.ok) {
      setUploadMsg((m) => ({ ...m, [kind]: `Not accepted: ${body.error}` }));
      return;
    }
    setValue('reportUploadId', body.id);
    versionRef.current = body.version;
    setVersion(body.version);
    setUploadNames((u) => ({ ...u, [kind]: body.originalName }));
    setUploadMsg((m) => ({ ...m, [kind]: `Uploaded ${body.originalName}.${body.warnings?.length ? ` ${body.warnings.join(' ')}` : ''}` }));
  };

  /** The full check of the draft as it stands, on the server; writes nothing, uses no attempt. */
  const runPrecheck = async (): Promise<PrecheckView | null> => {
    if (timer.current) clearTimeout(timer.current);
    if (inFlight.current) await inFlight.current;
    const res = await fetch('/api/submissions/check', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ practicalId: props.practicalId, draft: getValues() }),
    });
    const body = await res.json().catch(() => ({}));
    if (!res.ok) {
      setSubmitError(body.error ?? 'The draft could not be checked.');
      return null;
    }
    return body as PrecheckView;
  };

  const onCheck = async () => {
    if (checking) return;
    setChecking(true);
    setSubmitError(null);
    try {
      const view = await runPrecheck();
      if (view) setPrecheck(view);
    } finally {
      setChecking(false);
    }
  };

  /** Submit asks first: what goes in, what is missing, how many attempts are left after it. */
  const onSubmit = async () => {
    if (submitting || checking) return;
    setChecking(true);
    setSubmitError(null);
    try {
      const view = await runPrecheck();
      if (!view) return;
      setPrecheck(view);
      setConfirming(view);
    } finally {
      setChecking(false);
    }
  };

  const submitNow = async () => {
    if (submitting) return;
    setSubmitting(true);
    setSubmitError(null);
    try {
      if (timer.current) clearTimeout(timer.current);
      if (inFlight.current) await inFlight.current;
      const id = draftId ?? (await save());
      if (!id) return;
      const res = await fetch(`/api/submissions/${id}/submit`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ version: versionRef.current, draft: getValues() }),
      });
      const body = await res.json();
      if (!res.ok) {
        setSubmitError(body.error ?? 'The submission was not accepted.');
        return;
      }
      versionRef.current = body.draftVersion;
      setVersion(body.draftVersion);
      setResult(body.result);
      setPrecheck(null);
      setAttemptsLeft((n) => n - 1);
      // The attempts listed below the form (which one is marked, attempts left) come from the server.
      router.refresh();
    } finally {
      setSubmitting(false);
      setConfirming(null);
    }
  };

  return (
    <form onSubmit={(e) => { e.preventDefault(); void onSubmit(); }} noValidate className="space-y-6">
      <p className="text-sm text-ink-soft" aria-live="polite">
        {saveState === 'saving' && 'Saving draft…'}
        {saveState === 'saved' && 'Draft saved.'}
        {saveState === 'error' && <span className="text-danger">Draft not saved: {saveError}</span>}
      </p>

      {props.species.map((s) => {
        const qs = props.quantities.filter((q) => q.species === s.name);
        const iss = issues[s.name];
        const prop = proposals[s.name];
        const lines = watch(`species.${s.name}.lines`) ?? [];
        return (
          <fieldset key={s.name} className="card space-y-4">
            <legend className="px-1 text-lg font-bold">{s.display}</legend>
            <div>
              <label className="label" htmlFor={`lines-${s.name}`}>Line list for {s.display}</label>
              <textarea
                id={`lines-${s.name}`}
                rows={8}
                className="field num"
                aria-describedby={`lines-${s.name}-hint lines-${s.name}-status`}
                {...register(`species.${s.name}.lineText`, { onChange: (e) => readLines(s.name, e.target.value) })}
              />
              <p className="hint" id={`lines-${s.name}-hint`}>
                Paste from a spreadsheet (tab- or comma-separated, with or without a header): branch, J and wavenumber in cm⁻¹ per row, or a label such as P(3), or just the positions.
              </p>
              <div className="mt-2 flex flex-wrap items-center gap-3">
                <label className="btn-quiet cursor-pointer" htmlFor={`linefile-${s.name}`}>Read a CSV file…</label>
                <input
                  id={`linefile-${s.name}`}
                  type="file"
                  accept=".csv,.tsv,.txt,text/csv,text/plain"
                  className="sr-only"
                  onChange={async (e) => {
                    const f = e.target.files?.[0];
                    if (!f) return;
                    const t = await f.text();
                    setValue(`species.${s.name}.lineText`, t, { shouldDirty: true });
                    readLines(s.name, t);
                  }}
                />
                <button type="button" className="btn-quiet" onClick={() => void propose(s.name)} disabled={lines.length === 0}>Propose assignment</button>
              </div>
              <div id={`lines-${s.name}-status`} aria-live="polite" className="mt-2 text-sm">
                <p>{lines.length} line{lines.length === 1 ? '' : 's'} read, {lines.filter((l) => l.branch).length} assigned.</p>
                {iss?.errors.map((x, i) => <p key={`e${i}`} className="error-text">{x.message}</p>)}
                {iss?.warnings.map((x, i) => <p key={`w${i}`} className="text-ink-soft">Check: {x.message}</p>)}
              </div>
              {prop && (
                <div className="mt-3 rounded border border-rule bg-paper-sunk p-3 text-sm" aria-live="polite">
                  <p>
                    Proposed assignment: {prop.count} lines assigned{prop.unassigned ? `, ${prop.unassigned} left unassigned (perhaps the other isotopologue)` : ''}. Check it against your spectrum before you use it.
                  </p>
                  {prop.problems.map((p, i) => <p key={i} className="error-text">{p}</p>)}
                  <pre className="num mt-2 max-h-40 overflow-auto">{prop.text}</pre>
                  <div className="mt-2 flex gap-2">
                    <button type="button" className="btn" onClick={() => acceptProposal(s.name)} disabled={prop.count === 0}>Use this assignment</button>
                    <button type="button" className="btn-quiet" onClick={() => setProposals((m) => ({ ...m, [s.name]: null }))}>Discard</button>
                  </div>
                </div>
              )}
            </div>

            <div className="grid gap-4 md:grid-cols-2">
              {!qs.some((q) => q.key === 'bandCentre') && (
                <QuantityInput form={form} sp={s.name} name="bandCentre" label={`Band centre ν̃₀ (${s.display})`} options={['cm-1']} required={false} dimension="wavenumber" />
              )}
              {props.askOvertone && <QuantityInput form={form} sp={s.name} name="overtone" path="overtone" label={`First overtone band centre (${s.display})`} options={['cm-1']} required={false} dimension="wavenumber" />}
              {qs.map((q) => (
                <QuantityInput key={q.key} form={form} sp={s.name} name={q.key} label={`${q.label} (${s.display})`} options={q.unitOptions} required={q.uncertaintyRequired} dimension={q.dimension} defaultUnit={q.unit} />
              ))}
            </div>
          </fieldset>
        );
      })}

      <fieldset className="card min-w-0 space-y-3">
        <legend className="px-1 text-lg font-bold">Files</legend>
        <SpectrumPanel
          draftId={draftId}
          version={version}
          samples={props.samples}
          uploaded={props.spectrumNames}
          ensureDraft={save}
          onUploaded={(u) => {
            if (u.first) setValue('spectrumUploadId', u.id);
            else setValue(`spectra.${u.sample}`, u.id);
            versionRef.current = u.version;
            setVersion(u.version);
          }}
          onUseLines={(texts) => {
            for (const [sp, text] of Object.entries(texts)) {
              if (!props.species.some((x) => x.name === sp)) continue;
              setValue(`species.${sp}.lineText`, text, { shouldDirty: true });
              readLines(sp, text);
            }
          }}
        />
        <div>
          <label className="label" htmlFor="report-file">Report (PDF)</label>
          <input id="report-file" type="file" accept=".pdf,application/pdf" onChange={(e) => void uploadFile('report', e.target.files?.[0])} />
          <p className="hint" aria-live="polite">{uploadMsg.report ?? (uploadNames.report ? `Current: ${uploadNames.report}` : 'No report uploaded yet.')}</p>
        </div>
      </fieldset>

      <div className="card flex flex-wrap items-center gap-3" aria-labelledby="hand-in-h">
        <h3 id="hand-in-h" className="sr-only">Check and submit</h3>
        <button type="button" className="btn-quiet" onClick={() => void onCheck()} disabled={checking || submitting}>
          {checking && !confirming ? 'Checking…' : 'Check without submitting'}
        </button>
        <button type="submit" className="btn" disabled={submitting || checking || attemptsLeft <= 0}>
          {submitting ? 'Submitting…' : 'Submit…'}
        </button>
        <span className="text-sm text-ink-soft" data-testid="attempts-left">{attemptsLeft > 0 ? `${attemptsLeft} attempt${attemptsLeft === 1 ? '' : 's'} left` : 'No attempts left'}</span>
        <p className="hint w-full">“Check without submitting” costs nothing: it lists format problems{props.mode === 'practice' ? ' and shows the verdicts on your numbers' : ''} without using an attempt.</p>
      </div>
      <div aria-live="polite">
        {submitError && <p className="error-text" role="alert">{submitError}</p>}
        {precheck && !result && <PrecheckPanel view={precheck} />}
        {result && (
          <div className="space-y-2">
            <h2>Result of your submission</h2>
            <AttemptResult view={result} idPrefix="result" />
          </div>
        )}
      </div>
      <ConfirmDialog
        open={confirming !== null}
        title={`Submit attempt ${confirming ? confirming.attemptsTotal - confirming.attemptsLeft + 1 : ''}?`}
        confirmLabel={submitting ? 'Submitting…' : 'Submit this attempt'}
        cancelLabel="Not yet"
        busy={submitting || (confirming !== null && !confirming.late.accepted)}
        onCancel={() => setConfirming(null)}
        onConfirm={() => void submitNow()}
      >
        {confirming && <HandInSummary view={confirming} attemptNumber={confirming.attemptsTotal - confirming.attemptsLeft + 1} />}
      </ConfirmDialog>
    </form>
  );
}
