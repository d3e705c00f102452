'use client';

import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import useSWR from 'swr';
import { saveMarksSchema, type SaveMarksInput } from '@/lib/schemas/marking';
import type { MarkingView } from '@/lib/marking/view';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { TableScroll } from '@/components/ui/table-scroll';
import { cohortName } from '@/lib/display';
import { fetcher, send } from './fetcher';

const round2 = (v: number) => Math.round(v * 100) / 100;

/** A comment box that grows with its text, so a long comment is read whole, not cut at one line. */
function autoGrow(el: HTMLTextAreaElement | null) {
  if (!el) return;
  el.style.height = 'auto';
  el.style.height = `${el.scrollHeight + 2}px`;
}

export function MarkingForm({ initial, next = null }: { initial: MarkingView; next?: { id: number; student: string } | null }) {
  const id = initial.submission.id;
  const [confirmRelease, setConfirmRelease] = useState(false);
  const [saved, setSaved] = useState(false);
  const { data, mutate } = useSWR<MarkingView>(`/api/marking/${id}`, fetcher, { fallbackData: initial });
  const view = data ?? initial;
  const [status, setStatus] = useState('');
  const [problem, setProblem] = useState('');
  const [resubmit, setResubmit] = useState('');
  const form = useForm<SaveMarksInput>({
    resolver: zodResolver(saveMarksSchema) as never,
    defaultValues: {
      version: initial.submission.version,
      markerComment: initial.submission.markerComment ?? '',
      items: initial.marks.map((m) => ({ itemKey: m.itemKey, awarded: m.awarded ?? m.proposed ?? null, comment: m.comment ?? '' })),
    },
  });
  const items = form.watch('items');
  const awardedSum = items.reduce((s, i) => s + (Number.isFinite(Number(i.awarded)) ? Number(i.awarded) : 0), 0);
  const max = view.marks.reduce((s, m) => s + m.maxMarks, 0);
  const total = round2(awardedSum * (1 - view.submission.latePenalty / 100));
  const editable = view.submission.status === 'submitted' || view.submission.status === 'marked';

  const reload = async () => {
    const fresh = await mutate();
    if (fresh) {
      form.reset({
        version: fresh.submission.version,
        markerComment: fresh.submission.markerComment ?? '',
        items: fresh.marks.map((m) => ({ itemKey: m.itemKey, awarded: m.awarded ?? m.proposed ?? null, comment: m.comment ?? '' })),
      });
    }
  };

  const onSubmit = form.handleSubmit(async (values) => {
    setProblem('');
    setStatus('Saving…');
    const r = await send<{ status: string; awardedTotal: number | null; unmarked: number }>(`/api/marking/${id}`, 'PUT', values);
    if (r.ok) {
      setStatus(r.body.status === 'marked' ? `Saved: marked, total ${r.body.awardedTotal} of ${max}.` : `Saved; ${r.body.unmarked} item(s) still to mark.`);
      setSaved(r.body.status === 'marked');
      await reload();
    } else {
      setStatus('');
      setProblem(r.status === 409 ? `${r.body.error}` : r.body.error ?? 'Could not save.');
      if (r.body && 'fields' in r.body) {
        for (const key of Object.keys((r.body as { fields?: Record<string, string[]> }).fields ?? {})) {
          const i = view.marks.findIndex((m) => m.itemKey === key);
          if (i >= 0) form.setError(`items.${i}.comment`, { message: (r.body as { fields: Record<string, string[]> }).fields[key][0] });
        }
      }
    }
  });

  const accept = async () => {
    setProblem('');
    const r = await send<{ status: string; unmarked: number }>(`/api/marking/${id}/accept`, 'POST', { version: form.getValues('version') });
    if (r.ok) {
      setStatus(r.body.unmarked ? `Proposal accepted; ${r.body.unmarked} hand-marked item(s) still to mark.` : 'Proposal accepted: marked.');
      setSaved(!r.body.unmarked);
    }
    else setProblem(r.body.error ?? 'Could not accept.');
    await reload();
  };

  const release = async () => {
    setConfirmRelease(false);
    setProblem('');
    const r = await send<{ released: number; results: { ok: boolean; message?: string }[] }>('/api/release', 'POST', { submissionIds: [id] });
    if (r.ok && r.body.released === 1) setStatus('Released: the feedback e-mail is queued.');
    else setProblem(r.body.error ?? r.body.results?.[0]?.message ?? 'Could not release.');
    await reload();
  };

  const requestResubmission = async () => {
    setProblem('');
    const r = await send(`/api/marking/${id}/resubmission`, 'POST', { message: resubmit, version: form.getValues('version') });
    if (r.ok) {
      setStatus('Resubmission requested: the student has one more attempt and the e-mail is queued.');
      setResubmit('');
    } else setProblem(r.body.error ?? 'Could not request a resubmission.');
    await reload();
  };

  const resend = async (outboxId: number) => {
    const r = await send(`/api/marking/${id}/resend`, 'POST', { outboxId });
    setStatus(r.ok ? 'Queued to send again.' : '');
    if (!r.ok) setProblem(r.body.error ?? 'Could not resend.');
    await reload();
  };

  return (
    <>
      <section aria-labelledby="marks-heading" className="card mb-6">
        <h2 id="marks-heading" className="mb-2">Marks</h2>
        <p className="hint mb-3">
          Status: <strong>{view.submission.status.replace('-', ' ')}</strong>
          {view.marker ? ` · marked by ${view.marker.name}` : ''}. Changing a proposed mark needs a comment.
        </p>
        <form onSubmit={onSubmit} noValidate>
          <input type="hidden" {...form.register('version', { valueAsNumber: true })} />
          <table className="data-table stack-table mb-3">
            <thead>
              <tr>
                <th scope="col">Item</th>
                <th scope="col" className="num">Proposed</th>
                <th scope="col" className="num">Awarded</th>
                <th scope="col" className="w-2/5">Comment</th>
              </tr>
            </thead>
            <tbody>
              {view.marks.map((m, i) => {
                const err = form.formState.errors.items?.[i];
                const changed = m.proposed !== null && Number(items[i]?.awarded) !== m.proposed;
                return (
                  <tr key={m.itemKey} data-item={m.itemKey}>
                    <th scope="row" className="text-left font-bold sm:font-normal">
                      {m.label}
                      {m.reason && <span className="hint block" data-testid="mark-reason">{m.reason}</span>}
                      {m.handMarked && <span className="hint block">Marked by hand{m.guidance ? `: ${m.guidance}` : ''}</span>}
                    </th>
                    <td className="num" data-label="Proposed">
                      <span className="nowrap">{m.proposed ?? (m.handMarked ? 'by hand' : '—')} <span className="text-ink-soft">/ {m.maxMarks}</span></span>
                    </td>
                    <td className="num" data-label="Awarded">
                      <div>
                        <label className="sr-only" htmlFor={`awarded-${i}`}>Awarded marks for {m.label}</label>
                        <input
                          id={`awarded-${i}`}
                          className="field w-20 text-right"
                          type="number"
                          step="0.5"
                          min={0}
                          max={m.maxMarks}
                          disabled={!editable}
                          {...form.register(`items.${i}.awarded`, { setValueAs: (v) => (v === '' || v === null || v === undefined ? null : Number(v)) })}
                        />
                        {err?.awarded && <p className="error-text">{err.awarded.message}</p>}
                      </div>
                    </td>
                    <td data-label="Comment">
                      <div>
                        <label className="sr-only" htmlFor={`comment-${i}`}>Comment on {m.label}{changed ? ' (required)' : ''}</label>
                        {(() => {
                          const reg = form.register(`items.${i}.comment`);
                          return (
                            <textarea
                              id={`comment-${i}`}
                              rows={1}
                              className="field min-h-[2.25rem] resize-y"
                              disabled={!editable}
                              aria-required={changed}
                              placeholder={changed ? 'Required: why the change?' : ''}
                              {...reg}
                              ref={(el) => {
                                reg.ref(el);
                                autoGrow(el);
                              }}
                              onInput={(e) => autoGrow(e.currentTarget)}
                            />
                          );
                        })()}
                        {err?.comment && <p className="error-text" role="alert">{err.comment.message}</p>}
                      </div>
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          <label className="label" htmlFor="marker-comment">Comment to the student</label>
          <textarea id="marker-comment" className="field mb-3" rows={3} disabled={!editable} {...form.register('markerComment')} />
          <p className="mb-3 num" data-testid="marking-total">
            {view.submission.latePenalty ? (
              <>Marks {round2(awardedSum)} − late penalty {view.submission.latePenalty} % = <strong>{total} of {max}</strong></>
            ) : (
              <>Total <strong>{total} of {max}</strong></>
            )}
          </p>
          <div className="flex flex-wrap gap-2">
            <button type="submit" className="btn" disabled={!editable || form.formState.isSubmitting}>Save marks</button>
            <button type="button" className="btn-quiet" disabled={!editable} onClick={accept}>Accept the proposal</button>
            <button type="button" className="btn-quiet" disabled={view.submission.status !== 'marked'} onClick={() => setConfirmRelease(true)}>Release feedback…</button>
          </div>
        </form>
        <p className="mt-3" role="status" aria-live="polite" data-testid="marking-status">{status}</p>
        {saved && (
          <p className="mt-2">
            {next ? <a className="btn" href={`/marking/${next.id}`} data-testid="next-after-save">Next submission: {next.student} →</a> : <span className="text-ink-soft">Nothing else is waiting to be marked in your queue.</span>}{' '}
            <a className="btn-quiet" href="/marking">Back to the queue</a>
          </p>
        )}
        <ConfirmDialog
          open={confirmRelease}
          title="Release this feedback?"
          confirmLabel="Release now"
          onCancel={() => setConfirmRelease(false)}
          onConfirm={() => void release()}
        >
          <p>
            The feedback PDF for <strong>{view.student.name}</strong> ({view.practical.title}, {cohortName(view.cohort)}) is written now and e-mailed to <strong>{view.student.email}</strong>, with a total of{' '}
            <strong className="num">{view.submission.awardedTotal ?? total} of {max}</strong>.
          </p>
          <p>Released feedback cannot be withdrawn: later changes need a moderation or a resubmission.</p>
        </ConfirmDialog>
        {problem && (
          <p className="error-text mt-2" role="alert" data-testid="marking-problem">
            {problem}{' '}
            <button type="button" className="btn-quiet" onClick={reload}>Reload</button>
          </p>
        )}
      </section>

      <section aria-labelledby="resubmit-heading" className="card mb-6">
        <h2 id="resubmit-heading" className="mb-2">Ask for a resubmission</h2>
        <label className="label" htmlFor="resubmit-message">Message to the student</label>
        <textarea id="resubmit-message" className="field mb-2" rows={3} value={resubmit} onChange={(e) => setResubmit(e.target.value)} disabled={!editable} />
        <button type="button" className="btn-quiet" disabled={!editable || !resubmit.trim()} onClick={requestResubmission}>Request resubmission (one more attempt)</button>
      </section>

      <section aria-labelledby="delivery-heading" className="card mb-6">
        <h2 id="delivery-heading" className="mb-2">E-mail delivery</h2>
        {view.deliveries.length === 0 ? (
          <p className="text-ink-soft">No e-mail has been queued for this submission.</p>
        ) : (
          <TableScroll label="E-mails about this submission">
          <table className="data-table">
            <thead>
              <tr><th scope="col">Message</th><th scope="col">To</th><th scope="col">State</th><th scope="col" className="num">Attempts</th><th scope="col">Last error</th><th scope="col"><span className="sr-only">Actions</span></th></tr>
            </thead>
            <tbody>
              {view.deliveries.map((d) => (
                <tr key={d.id} data-delivery={d.status}>
                  <td>{d.kind === 'release' ? 'Feedback' : d.kind === 'resubmit' ? 'Resubmission request' : d.kind}</td>
                  <td>{d.to}</td>
                  <td>{d.status}{d.sentAt ? ` ${new Date(d.sentAt).toLocaleString('en-GB', { timeStyle: 'short', dateStyle: 'short' })}` : ''}</td>
                  <td className="num">{d.attempts}</td>
                  <td className="text-xs">{d.lastError ?? '—'}</td>
                  <td>{(d.status === 'sent' || d.status === 'failed') && <button type="button" className="btn-quiet" onClick={() => resend(d.id)}>Resend</button>}</td>
                </tr>
              ))}
            </tbody>
          </table>
          </TableScroll>
        )}
      </section>
    </>
  );
}
