'use client';
import { useEffect, useState } from 'react';
import { useRouter } from 'next/navigation';
import { api } from '@/lib/api-client';
import type { PlatformRosterPreview, PlatformRosterRow, PlatformRosterResult } from '@/lib/lti/roster';

export type PlatformContextView = {
  id: number;
  contextId: string;
  title: string | null;
  platform: string;
  defaultCohortId: number | null;
  roster: boolean;
  gradebook: boolean;
  rosterSyncedAt: string | null;
};
export type ScoreRow = {
  id: number;
  ltiContextId: number;
  submissionId: number;
  practical: string;
  student: string;
  score: string;
  status: string;
  attempts: number;
  lastError: string | null;
  sentAt: string | null;
};
type Message = { ok: boolean; text: string } | null;

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short' }) : '—');

const ROSTER: Record<PlatformRosterRow['status'], { word: string; symbol: string; cls: string }> = {
  new: { word: 'New', symbol: '+', cls: 'text-verdict-within bg-verdict-within-bg' },
  changed: { word: 'Changed', symbol: '◐', cls: 'text-verdict-partial bg-verdict-partial-bg' },
  leaving: { word: 'Leaving', symbol: '−', cls: 'text-verdict-outside bg-verdict-outside-bg' },
  unchanged: { word: 'Unchanged', symbol: '=', cls: 'text-verdict-unchecked bg-verdict-unchecked-bg' },
  'not-taken': { word: 'Not taken', symbol: '–', cls: 'text-verdict-unchecked bg-verdict-unchecked-bg' },
};

export const DELIVERY: Record<string, { word: string; symbol: string; cls: string }> = {
  queued: { word: 'Queued', symbol: '…', cls: 'text-verdict-partial bg-verdict-partial-bg' },
  sending: { word: 'Sending', symbol: '…', cls: 'text-verdict-partial bg-verdict-partial-bg' },
  sent: { word: 'Sent', symbol: '✓', cls: 'text-verdict-within bg-verdict-within-bg' },
  failed: { word: 'Failed', symbol: '✗', cls: 'text-verdict-outside bg-verdict-outside-bg' },
};

export function Badge({ kind }: { kind: { word: string; symbol: string; cls: string } }) {
  return (
    <span className={`inline-flex gap-1 rounded px-2 py-0.5 text-sm font-bold ${kind.cls}`}>
      <span aria-hidden="true">{kind.symbol}</span>
      {kind.word}
    </span>
  );
}

function Status({ message }: { message: Message }) {
  return (
    <p aria-live="polite" className={message?.ok ? 'mt-2 text-sm text-verdict-within' : 'error-text'}>
      {message ? `${message.ok ? '✓' : '✗'} ${message.text}` : ''}
    </p>
  );
}

export function PlatformCourse({
  contexts,
  cohorts,
  scores,
  review,
}: {
  contexts: PlatformContextView[];
  cohorts: { id: number; name: string }[];
  scores: ScoreRow[];
  review: number | null;
}) {
  return (
    <div className="space-y-6">
      {contexts.map((c) => (
        <div key={c.id} className="space-y-6">
          <ContextCard context={c} cohorts={cohorts} />
          <Roster context={c} autoload={review === c.id} />
          <Scores context={c} rows={scores.filter((s) => s.ltiContextId === c.id)} />
        </div>
      ))}
    </div>
  );
}

function ContextCard({ context, cohorts }: { context: PlatformContextView; cohorts: { id: number; name: string }[] }) {
  const router = useRouter();
  const [cohort, setCohort] = useState(context.defaultCohortId ? String(context.defaultCohortId) : '');
  const [msg, setMsg] = useState<Message>(null);
  const save = async () => {
    const r = await api.patch(`/api/lti/contexts/${context.id}`, { defaultCohortId: cohort ? Number(cohort) : null });
    setMsg(r.ok ? { ok: true, text: 'Saved.' } : { ok: false, text: r.error.message });
    if (r.ok) router.refresh();
  };
  return (
    <section aria-labelledby={`ctx-${context.id}`} className="card">
      <h2 id={`ctx-${context.id}`} className="mb-1">
        {context.title ?? context.contextId}
      </h2>
      <p className="text-sm text-ink-soft">
        {context.platform} · context id <code>{context.contextId}</code> ·{' '}
        {context.roster ? '✓ roster offered' : '– roster not offered yet'} ·{' '}
        {context.gradebook ? '✓ gradebook offered' : '– gradebook not offered yet'}
      </p>
      <p className="hint">
        The platform offers its roster and gradebook in its launches: they appear after the first launch from this course.
      </p>
      <div className="mt-3 flex flex-wrap items-end gap-2">
        <div>
          <label htmlFor={`cohort-${context.id}`} className="label">
            Cohort for students arriving from the platform
          </label>
          <select id={`cohort-${context.id}`} className="field" value={cohort} onChange={(e) => setCohort(e.target.value)}>
            <option value="">The course’s only open cohort</option>
            {cohorts.map((c) => (
              <option key={c.id} value={c.id}>
                {c.name}
              </option>
            ))}
          </select>
        </div>
        <button type="button" className="btn-quiet" onClick={save}>
          Save
        </button>
      </div>
      <Status message={msg} />
    </section>
  );
}

function Roster({ context, autoload }: { context: PlatformContextView; autoload: boolean }) {
  const router = useRouter();
  const [preview, setPreview] = useState<PlatformRosterPreview | null>(null);
  const [busy, setBusy] = useState(false);
  const [msg, setMsg] = useState<Message>(null);
  const [confirmed, setConfirmed] = useState(false);
  const load = async () => {
    setBusy(true);
    setMsg(null);
    const r = await api.get<PlatformRosterPreview>(`/api/lti/contexts/${context.id}/roster`);
    setBusy(false);
    if (!r.ok) return setMsg({ ok: false, text: r.error.message });
    setPreview(r.data);
    const c = r.data.counts;
    setMsg({
      ok: true,
      text:
        c.new + c.changed + c.leaving
          ? `${c.new} new, ${c.changed} changed, ${c.leaving} leaving. Nothing has been written yet.`
          : 'The course already matches the learning platform’s roster.',
    });
  };
  const confirm = async () => {
    if (!preview) return;
    setBusy(true);
    const r = await api.post<PlatformRosterResult>(`/api/lti/contexts/${context.id}/roster`, { fingerprint: preview.fingerprint });
    setBusy(false);
    if (!r.ok) return setMsg({ ok: false, text: r.error.message });
    const a = r.data.applied;
    setMsg({ ok: true, text: `Done: ${a.added} added, ${a.renamed} renamed, ${a.connected} connected, ${a.removed} role(s) ended.` });
    setPreview(null);
    setConfirmed(true);
    router.refresh();
  };
  useEffect(() => {
    // eslint-disable-next-line react-hooks/set-state-in-effect -- the roster is fetched once when the page opens for a review (?review)
    if (autoload && context.roster) void load();
    // eslint-disable-next-line react-hooks/exhaustive-deps -- once on mount, as above; later changes of `load` must not fetch again
  }, [autoload]);
  const changes = preview ? preview.counts.new + preview.counts.changed + preview.counts.leaving : 0;
  return (
    <section aria-labelledby={`roster-${context.id}`} className="card">
      <h2 id={`roster-${context.id}`} className="mb-1">
        Roster from the learning platform
      </h2>
      <p className="hint mb-3">
        Compare the course with the platform’s list of participants. The comparison writes nothing; confirming writes every change shown, or
        none if the roster moved in between. Last confirmed: {when(context.rosterSyncedAt)}.
      </p>
      {autoload && !confirmed && (
        <p className="mb-2 font-bold" role="status">
          The learning platform’s roster differs from this course: review it below.
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        <button type="button" className="btn-quiet" disabled={busy || !context.roster} onClick={load}>
          Compare with the platform
        </button>
        <button type="button" className="btn" disabled={busy || !preview || changes === 0} onClick={confirm}>
          Confirm {changes ? `${changes} change(s)` : 'changes'}
        </button>
      </div>
      <Status message={msg} />
      {preview && (
        <div className="mt-3 overflow-x-auto">
          <table className="data-table" aria-label="Roster comparison">
            <thead>
              <tr>
                <th scope="col">Status</th>
                <th scope="col">Name</th>
                <th scope="col">E-mail</th>
                <th scope="col">Platform role</th>
                <th scope="col">What confirming does</th>
              </tr>
            </thead>
            <tbody>
              {preview.rows.map((r) => (
                <tr key={`${r.sub}-${r.status}`} data-roster={r.status}>
                  <td>
                    <Badge kind={ROSTER[r.status]} />
                  </td>
                  <td>{r.name}</td>
                  <td>{r.email ?? '—'}</td>
                  <td>{r.platformRoles.join(', ') || '—'}</td>
                  <td>{r.change}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}

function Scores({ context, rows }: { context: PlatformContextView; rows: ScoreRow[] }) {
  const router = useRouter();
  const [msg, setMsg] = useState<Message>(null);
  const resend = async (id: number) => {
    const r = await api.post(`/api/lti/scores/${id}/resend`);
    setMsg(r.ok ? { ok: true, text: 'Queued again.' } : { ok: false, text: r.error.message });
    router.refresh();
  };
  return (
    <section aria-labelledby={`scores-${context.id}`} className="card">
      <h2 id={`scores-${context.id}`} className="mb-1">
        Scores sent to the gradebook
      </h2>
      <p className="hint mb-3">
        Each release queues the student’s total for the platform’s gradebook; if the platform is down it waits and goes out once it is back,
        once.
      </p>
      {rows.length === 0 ? (
        <p className="text-ink-soft">
          No score has been queued yet: scores go out when marking is released, for students who came from the platform or its roster.
        </p>
      ) : (
        <div className="overflow-x-auto">
          <table className="data-table">
            <thead>
              <tr>
                <th scope="col">Student</th>
                <th scope="col">Practical</th>
                <th scope="col" className="num">
                  Score
                </th>
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
              {rows.map((r) => (
                <tr key={r.id} data-score-delivery={r.status}>
                  <td>
                    <a href={`/marking/${r.submissionId}`}>{r.student}</a>
                  </td>
                  <td>{r.practical}</td>
                  <td className="num">{r.score}</td>
                  <td>
                    <Badge kind={DELIVERY[r.status] ?? DELIVERY.queued} /> <span className="text-xs">{r.sentAt ? when(r.sentAt) : ''}</span>
                  </td>
                  <td className="num">{r.attempts}</td>
                  <td className="text-xs">{r.lastError ?? '—'}</td>
                  <td>
                    {(r.status === 'sent' || r.status === 'failed') && (
                      <button type="button" className="btn-quiet" onClick={() => resend(r.id)}>
                        Resend
                      </button>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <Status message={msg} />
    </section>
  );
}
