'use client';

/**
 * The marks of one submission: the table of items (proposed, awarded, comment), the total, and
 * the actions on it (save, accept the proposal, release, ask for a resubmission, resend an
 * e-mail). The view is read through SWR from /api/marking/[id], starting from the page's copy.
 */
import { useState } from 'react';
import Link from 'next/link';
import { useForm, useWatch, type UseFormReturn } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { saveMarksSchema, type SaveMarksInput } from '@/lib/schemas/marking';
import type { MarkingView } from '@/lib/marking/view';
import type { SaveResult } from '@/lib/marking/marks';
import type { ReleaseSummary } from '@/lib/marking/release';
import { api, useApi } from '@/lib/api-client';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { TableScroll } from '@/components/ui/table-scroll';
import { cohortName } from '@/lib/display';

const round2 = (v: number) => Math.round(v * 100) / 100;

/** A comment box that grows with its text, so a long comment is read whole, not cut at one line. */
function autoGrow(el: HTMLTextAreaElement | null) {
  if (!el) return;
  el.style.height = 'auto';
  el.style.height = `${el.scrollHeight + 2}px`;
}

type MarksForm = UseFormReturn<SaveMarksInput>;
type Feedback = { setStatus: (s: string) => void; setProblem: (s: string) => void; setSaved: (b: boolean) => void };

const formValues = (view: MarkingView): SaveMarksInput => ({
  version: view.submission.version,
  markerComment: view.submission.markerComment ?? '',
  items: view.marks.map((m) => ({ itemKey: m.itemKey, awarded: m.awarded ?? m.proposed ?? null, comment: m.comment ?? '' })),
});

export function MarkingForm({ initial, next = null }: { initial: MarkingView; next?: { id: number; student: string } | null }) {
  const id = initial.submission.id;
  const [confirmRelease, setConfirmRelease] = useState(false);
  const [saved, setSaved] = useState(false);
  const { data, mutate } = useApi<MarkingView>(`/api/marking/${id}`, { fallbackData: initial });
  const view = data ?? initial;
  const [status, setStatus] = useState('');
  const [problem, setProblem] = useState('');
  const form = useForm<SaveMarksInput>({ resolver: zodResolver(saveMarksSchema) as never, defaultValues: formValues(initial) });
  const items = useWatch({ control: form.control, name: 'items' });
  const awardedSum = items.reduce((s, i) => s + (Number.isFinite(Number(i.awarded)) ? Number(i.awarded) : 0), 0);
  const max = view.marks.reduce((s, m) => s + m.maxMarks, 0);
  const total = round2(awardedSum * (1 - view.submission.latePenalty / 100));
  const editable = view.submission.status === 'submitted' || view.submission.status === 'marked';

  const reload = async () => {
    const fresh = await mutate();
    if (fresh) form.reset(formValues(fresh));
  };
  const actions = useMarkingActions(id, form, view, max, reload, { setStatus, setProblem, setSaved });

  return (
    <>
      <section aria-labelledby="marks-heading" className="card mb-6">
        <h2 id="marks-heading" className="mb-2">
          Marks
        </h2>
        <p className="hint mb-3">
          Status: <strong>{view.submission.status.replace('-', ' ')}</strong>
          {view.marker ? ` · marked by ${view.marker.name}` : ''}. Changing a proposed mark needs a comment.
        </p>
        <form onSubmit={actions.save} noValidate>
          <input type="hidden" {...form.register('version', { valueAsNumber: true })} />
          <MarksTable view={view} form={form} items={items} editable={editable} />
          <label className="label" htmlFor="marker-comment">
            Comment to the student
          </label>
          <textarea id="marker-comment" className="field mb-3" rows={3} disabled={!editable} {...form.register('markerComment')} />
          <p className="mb-3 num" data-testid="marking-total">
            {view.submission.latePenalty ? (
              <>
                Marks {round2(awardedSum)} − late penalty {view.submission.latePenalty} % ={' '}
                <strong>
                  {total} of {max}
                </strong>
              </>
            ) : (
              <>
                Total{' '}
                <strong>
                  {total} of {max}
                </strong>
              </>
            )}
          </p>
          <div className="flex flex-wrap gap-2">
            <button type="submit" className="btn" disabled={!editable || form.formState.isSubmitting}>
              Save marks
            </button>
            <button type="button" className="btn-quiet" disabled={!editable} onClick={actions.accept}>
              Accept the proposal
            </button>
            <button
              type="button"
              className="btn-quiet"
              disabled={view.submission.status !== 'marked'}
              onClick={() => setConfirmRelease(true)}
            >
              Release feedback…
            </button>
          </div>
        </form>
        <p className="mt-3" role="status" aria-live="polite" data-testid="marking-status">
          {status}
        </p>
        {saved && <AfterSave next={next} />}
        <ReleaseDialog
          open={confirmRelease}
          view={view}
          total={total}
          max={max}
          onCancel={() => setConfirmRelease(false)}
          onConfirm={() => {
            setConfirmRelease(false);
            void actions.release();
          }}
        />
        {problem && (
          <p className="error-text mt-2" role="alert" data-testid="marking-problem">
            {problem}{' '}
            <button type="button" className="btn-quiet" onClick={reload}>
              Reload
            </button>
          </p>
        )}
      </section>
      <ResubmissionSection editable={editable} onRequest={actions.requestResubmission} />
      <DeliverySection view={view} onResend={actions.resend} />
    </>
  );
}

/** The calls behind the buttons; each says what happened in the status line or the problem line. */
function useMarkingActions(
  id: number,
  form: MarksForm,
  view: MarkingView,
  max: number,
  reload: () => Promise<void>,
  { setStatus, setProblem, setSaved }: Feedback,
) {
  const save = form.handleSubmit(async (values) => {
    setProblem('');
    setStatus('Saving…');
    const r = await api.put<SaveResult>(`/api/marking/${id}`, values);
    if (r.ok) {
      setStatus(
        r.data.status === 'marked'
          ? `Saved: marked, total ${r.data.awardedTotal} of ${max}.`
          : `Saved; ${r.data.unmarked} item(s) still to mark.`,
      );
      setSaved(r.data.status === 'marked');
      await reload();
      return;
    }
    setStatus('');
    setProblem(r.error.message);
    // The server names the items whose changed mark lacks a comment.
    for (const [key, messages] of Object.entries(r.error.fields)) {
      const i = view.marks.findIndex((m) => m.itemKey === key);
      if (i >= 0) form.setError(`items.${i}.comment`, { message: messages[0] });
    }
  });

  const accept = async () => {
    setProblem('');
    const r = await api.post<SaveResult>(`/api/marking/${id}/accept`, { version: form.getValues('version') });
    if (r.ok) {
      setStatus(
        r.data.unmarked ? `Proposal accepted; ${r.data.unmarked} hand-marked item(s) still to mark.` : 'Proposal accepted: marked.',
      );
      setSaved(!r.data.unmarked);
    } else setProblem(r.error.message);
    await reload();
  };

  const release = async () => {
    setProblem('');
    const r = await api.post<ReleaseSummary>('/api/release', { submissionIds: [id] });
    if (r.ok && r.data.released === 1) setStatus('Released: the feedback e-mail is queued.');
    else setProblem(r.ok ? (r.data.results[0]?.message ?? 'Could not release.') : r.error.message);
    await reload();
  };

  const requestResubmission = async (message: string) => {
    setProblem('');
    const r = await api.post(`/api/marking/${id}/resubmission`, { message, version: form.getValues('version') });
    if (r.ok) setStatus('Resubmission requested: the student has one more attempt and the e-mail is queued.');
    else setProblem(r.error.message);
    await reload();
    return r.ok;
  };

  const resend = async (outboxId: number) => {
    const r = await api.post(`/api/marking/${id}/resend`, { outboxId });
    setStatus(r.ok ? 'Queued to send again.' : '');
    if (!r.ok) setProblem(r.error.message);
    await reload();
  };

  return { save, accept, release, requestResubmission, resend };
}

function MarksTable({
  view,
  form,
  items,
  editable,
}: {
  view: MarkingView;
  form: MarksForm;
  items: SaveMarksInput['items'];
  editable: boolean;
}) {
  return (
    <table className="data-table stack-table mb-3">
      <thead>
        <tr>
          <th scope="col">Item</th>
          <th scope="col" className="num">
            Proposed
          </th>
          <th scope="col" className="num">
            Awarded
          </th>
          <th scope="col" className="w-2/5">
            Comment
          </th>
        </tr>
      </thead>
      <tbody>
        {view.marks.map((m, i) => (
          <MarkRow
            key={m.itemKey}
            mark={m}
            i={i}
            form={form}
            editable={editable}
            changed={m.proposed !== null && Number(items[i]?.awarded) !== m.proposed}
          />
        ))}
      </tbody>
    </table>
  );
}

function MarkRow({
  mark: m,
  i,
  form,
  editable,
  changed,
}: {
  mark: MarkingView['marks'][number];
  i: number;
  form: MarksForm;
  editable: boolean;
  changed: boolean;
}) {
  const err = form.formState.errors.items?.[i];
  const comment = form.register(`items.${i}.comment`);
  return (
    <tr data-item={m.itemKey}>
      <th scope="row" className="text-left font-bold sm:font-normal">
        {m.label}
        {m.reason && (
          <span className="hint block" data-testid="mark-reason">
            {m.reason}
          </span>
        )}
        {m.handMarked && <span className="hint block">Marked by hand{m.guidance ? `: ${m.guidance}` : ''}</span>}
      </th>
      <td className="num" data-label="Proposed">
        <span className="nowrap">
          {m.proposed ?? (m.handMarked ? 'by hand' : '—')} <span className="text-ink-soft">/ {m.maxMarks}</span>
        </span>
      </td>
      <td className="num" data-label="Awarded">
        <div>
          <label className="sr-only" htmlFor={`awarded-${i}`}>
            Awarded marks for {m.label}
          </label>
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
          <label className="sr-only" htmlFor={`comment-${i}`}>
            Comment on {m.label}
            {changed ? ' (required)' : ''}
          </label>
          <textarea
            id={`comment-${i}`}
            rows={1}
            className="field min-h-[2.25rem] resize-y"
            disabled={!editable}
            aria-required={changed}
            placeholder={changed ? 'Required: why the change?' : ''}
            {...comment}
            ref={(el) => {
              comment.ref(el);
              autoGrow(el);
            }}
            onInput={(e) => autoGrow(e.currentTarget)}
          />
          {err?.comment && (
            <p className="error-text" role="alert">
              {err.comment.message}
            </p>
          )}
        </div>
      </td>
    </tr>
  );
}

function AfterSave({ next }: { next: { id: number; student: string } | null }) {
  return (
    <p className="mt-2">
      {next ? (
        <Link className="btn" href={`/marking/${next.id}`} data-testid="next-after-save">
          Next submission: {next.student} →
        </Link>
      ) : (
        <span className="text-ink-soft">Nothing else is waiting to be marked in your queue.</span>
      )}{' '}
      <Link className="btn-quiet" href="/marking">
        Back to the queue
      </Link>
    </p>
  );
}

function ReleaseDialog({
  open,
  view,
  total,
  max,
  onCancel,
  onConfirm,
}: {
  open: boolean;
  view: MarkingView;
  total: number;
  max: number;
  onCancel: () => void;
  onConfirm: () => void;
}) {
  return (
    <ConfirmDialog open={open} title="Release this feedback?" confirmLabel="Release now" onCancel={onCancel} onConfirm={onConfirm}>
      <p>
        The feedback PDF for <strong>{view.student.name}</strong> ({view.practical.title}, {cohortName(view.cohort)}) is written now and
        e-mailed to <strong>{view.student.email}</strong>, with a total of{' '}
        <strong className="num">
          {view.submission.awardedTotal ?? total} of {max}
        </strong>
        .
      </p>
      <p>Released feedback cannot be withdrawn: later changes need a moderation or a resubmission.</p>
    </ConfirmDialog>
  );
}

function ResubmissionSection({ editable, onRequest }: { editable: boolean; onRequest: (message: string) => Promise<boolean> }) {
  const [message, setMessage] = useState('');
  return (
    <section aria-labelledby="resubmit-heading" className="card mb-6">
      <h2 id="resubmit-heading" className="mb-2">
        Ask for a resubmission
      </h2>
      <label className="label" htmlFor="resubmit-message">
        Message to the student
      </label>
      <textarea
        id="resubmit-message"
        className="field mb-2"
        rows={3}
        value={message}
        onChange={(e) => setMessage(e.target.value)}
        disabled={!editable}
      />
      <button
        type="button"
        className="btn-quiet"
        disabled={!editable || !message.trim()}
        onClick={async () => {
          if (await onRequest(message)) setMessage('');
        }}
      >
        Request resubmission (one more attempt)
      </button>
    </section>
  );
}

function DeliverySection({ view, onResend }: { view: MarkingView; onResend: (outboxId: number) => void }) {
  return (
    <section aria-labelledby="delivery-heading" className="card mb-6">
      <h2 id="delivery-heading" className="mb-2">
        E-mail delivery
      </h2>
      {view.deliveries.length === 0 ? (
        <p className="text-ink-soft">No e-mail has been queued for this submission.</p>
      ) : (
        <TableScroll label="E-mails about this submission">
          <table className="data-table">
            <thead>
              <tr>
                <th scope="col">Message</th>
                <th scope="col">To</th>
                <th scope="col">State</th>
                <th scope="col" className="num">
                  Attempts
                </th>
                <th scope="col">Last error</th>
                <th scope="col">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {view.deliveries.map((d) => (
                <tr key={d.id} data-delivery={d.status}>
                  <td>{d.kind === 'release' ? 'Feedback' : d.kind === 'resubmit' ? 'Resubmission request' : d.kind}</td>
                  <td>{d.to}</td>
                  <td>
                    {d.status}
                    {d.sentAt ? ` ${new Date(d.sentAt).toLocaleString('en-GB', { timeStyle: 'short', dateStyle: 'short' })}` : ''}
                  </td>
                  <td className="num">{d.attempts}</td>
                  <td className="text-xs">{d.lastError ?? '—'}</td>
                  <td>
                    {(d.status === 'sent' || d.status === 'failed') && (
                      <button type="button" className="btn-quiet" onClick={() => onResend(d.id)}>
                        Resend
                      </button>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </TableScroll>
      )}
    </section>
  );
}
