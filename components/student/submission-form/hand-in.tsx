'use client';
/**
 * Checking and submitting: "Check without submitting" runs the full check on the server and writes
 * nothing; Submit runs the same check, says what will be handed in and how many attempts remain,
 * and submits only when the student confirms.
 */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import type { UseFormReturn } from 'react-hook-form';
import type { Draft } from '@/lib/schemas/submission';
import type { PrecheckView } from '@/lib/submissions/precheck';
import type { StudentAttemptView } from '@/lib/submissions/view';
import type { SubmitAnswer } from '@/lib/submissions/service';
import { api } from '@/lib/api-client';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { AttemptResult } from '../attempt-result';
import { HandInSummary, PrecheckPanel } from '../precheck-panel';
import type { DraftHandle } from './use-draft';

export function useHandIn(form: UseFormReturn<Draft>, practicalId: number, draft: DraftHandle, initialAttemptsLeft: number) {
  const router = useRouter();
  const [submitting, setSubmitting] = useState(false);
  const [submitError, setSubmitError] = useState<string | null>(null);
  const [result, setResult] = useState<StudentAttemptView | null>(null);
  const [attemptsLeft, setAttemptsLeft] = useState(initialAttemptsLeft);
  const [precheck, setPrecheck] = useState<PrecheckView | null>(null);
  const [checking, setChecking] = useState(false);
  const [confirming, setConfirming] = useState<PrecheckView | null>(null);

  /** The full check of the draft as it stands, on the server; writes nothing, uses no attempt. */
  const runPrecheck = async (): Promise<PrecheckView | null> => {
    await draft.settle();
    const r = await api.post<PrecheckView>('/api/submissions/check', { practicalId, draft: form.getValues() });
    if (!r.ok) {
      setSubmitError(r.error.message);
      return null;
    }
    return r.data;
  };

  /** Runs the check; `thenConfirm` opens the confirmation with its result (Submit…). */
  const check = async (thenConfirm: boolean) => {
    if (checking || (thenConfirm && submitting)) return;
    setChecking(true);
    setSubmitError(null);
    try {
      const view = await runPrecheck();
      if (!view) return;
      setPrecheck(view);
      if (thenConfirm) setConfirming(view);
    } finally {
      setChecking(false);
    }
  };

  const submitNow = async () => {
    if (submitting) return;
    setSubmitting(true);
    setSubmitError(null);
    try {
      await draft.settle();
      const id = draft.draftId ?? (await draft.save());
      if (!id) return;
      const r = await api.post<SubmitAnswer>(`/api/submissions/${id}/submit`, {
        version: draft.versionRef.current,
        draft: form.getValues(),
      });
      if (!r.ok) {
        setSubmitError(r.error.message);
        return;
      }
      draft.setVersion(r.data.draftVersion);
      setResult(r.data.result);
      setPrecheck(null);
      setAttemptsLeft((n) => n - 1);
      // The attempts listed below the form (which one is marked, attempts left) come from the server.
      router.refresh();
    } finally {
      setSubmitting(false);
      setConfirming(null);
    }
  };

  return {
    submitting,
    submitError,
    result,
    attemptsLeft,
    precheck,
    checking,
    confirming,
    check,
    submitNow,
    cancel: () => setConfirming(null),
  };
}

export type HandIn = ReturnType<typeof useHandIn>;

export function HandInBar({ handIn: h, mode }: { handIn: HandIn; mode: 'practice' | 'assessed' }) {
  return (
    <div className="card flex flex-wrap items-center gap-3" aria-labelledby="hand-in-h">
      <h3 id="hand-in-h" className="sr-only">
        Check and submit
      </h3>
      <button type="button" className="btn-quiet" onClick={() => void h.check(false)} disabled={h.checking || h.submitting}>
        {h.checking && !h.confirming ? 'Checking…' : 'Check without submitting'}
      </button>
      <button type="submit" className="btn" disabled={h.submitting || h.checking || h.attemptsLeft <= 0}>
        {h.submitting ? 'Submitting…' : 'Submit…'}
      </button>
      <span className="text-sm text-ink-soft" data-testid="attempts-left">
        {h.attemptsLeft > 0 ? `${h.attemptsLeft} attempt${h.attemptsLeft === 1 ? '' : 's'} left` : 'No attempts left'}
      </span>
      <p className="hint w-full">
        “Check without submitting” costs nothing: it lists format problems
        {mode === 'practice' ? ' and shows the verdicts on your numbers' : ''} without using an attempt.
      </p>
    </div>
  );
}

export function HandInOutcome({ handIn: h }: { handIn: HandIn }) {
  return (
    <div aria-live="polite">
      {h.submitError && (
        <p className="error-text" role="alert">
          {h.submitError}
        </p>
      )}
      {h.precheck && !h.result && <PrecheckPanel view={h.precheck} />}
      {h.result && (
        <div className="space-y-2">
          <h2>Result of your submission</h2>
          <AttemptResult view={h.result} idPrefix="result" />
        </div>
      )}
    </div>
  );
}

export function SubmitDialog({ handIn: h }: { handIn: HandIn }) {
  const c = h.confirming;
  const attemptNumber = c ? c.attemptsTotal - c.attemptsLeft + 1 : null;
  return (
    <ConfirmDialog
      open={c !== null}
      title={`Submit attempt ${attemptNumber ?? ''}?`}
      confirmLabel={h.submitting ? 'Submitting…' : 'Submit this attempt'}
      cancelLabel="Not yet"
      busy={h.submitting || (c !== null && !c.late.accepted)}
      onCancel={h.cancel}
      onConfirm={() => void h.submitNow()}
    >
      {c && attemptNumber !== null && <HandInSummary view={c} attemptNumber={attemptNumber} />}
    </ConfirmDialog>
  );
}
