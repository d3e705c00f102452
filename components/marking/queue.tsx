'use client';
/**
 * The marking queue: filters, a keyset-paged table of submissions (keys j/k, Enter, a, r, x), and
 * releasing a selection with progress as the server streams it.
 */
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { useRouter } from 'next/navigation';
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type Table } from '@tanstack/react-table';
import type { QueuePage, QueueRow } from '@/lib/marking/queue';
import type { SaveResult } from '@/lib/marking/marks';
import type { ReleaseProgress, ReleaseSummary } from '@/lib/marking/release';
import { QUEUE_FLAGS, QUEUE_STATUSES, QUEUE_SORTS } from '@/lib/schemas/marking';
import { api, postStream, useApi } from '@/lib/api-client';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { Field } from '@/components/ui/field';
/** page is shown only; the server pages by the cursor (after / before a row). */
type Filters = {
  practicalId: string;
  cohortId: string;
  status: string;
  flag: string;
  sort: string;
  dir: string;
  page: number;
  after?: string;
  before?: string;
};

const FLAG_LABEL: Record<string, string> = {
  outside: 'Outside tolerance',
  slip: 'Named slip',
  late: 'Late',
  duplicate: 'Duplicate data',
  spectrum: 'Spectrum mismatch',
};
const STATUS_LABEL: Record<string, string> = {
  submitted: 'Submitted',
  marked: 'Marked',
  released: 'Released',
  'resubmission-requested': 'Resubmission requested',
};
const SORT_LABEL: Record<string, string> = {
  submittedAt: 'Submission time',
  student: 'Student',
  practical: 'Practical',
  status: 'Status',
  proposedTotal: 'Proposed total',
  awardedTotal: 'Awarded total',
};

const col = createColumnHelper<QueueRow>();

export function MarkingQueue({
  practicals,
  cohorts,
}: {
  practicals: { id: number; title: string }[];
  cohorts: { id: number; name: string }[];
}) {
  const router = useRouter();
  const [f, setF] = useState<Filters>({ practicalId: '', cohortId: '', status: '', flag: '', sort: 'submittedAt', dir: 'desc', page: 1 });
  const [cursor, setCursor] = useState(0);
  const [selected, setSelected] = useState<Set<number>>(new Set());
  const [message, setMessage] = useState('');
  const [confirming, setConfirming] = useState(false);
  const [known, setKnown] = useState<Map<number, QueueRow>>(new Map());
  const tableRef = useRef<HTMLTableSectionElement>(null);
  const regionRef = useRef<HTMLDivElement>(null);
  const query = useMemo(() => {
    const p = new URLSearchParams();
    for (const [k, v] of Object.entries(f)) if (v !== '' && v !== undefined) p.set(k, String(v));
    return p.toString();
  }, [f]);
  const { data, error, isLoading, mutate } = useApi<QueuePage>(`/api/marking/queue?${query}`, { keepPreviousData: true });
  const rows = useMemo(() => data?.rows ?? [], [data]);
  const set = (patch: Partial<Filters>) => {
    setF((old) => ({ ...old, page: 1, after: undefined, before: undefined, ...patch }));
    setCursor(0);
  };

  useEffect(() => {
    if (rows.length)
      setKnown((m) => {
        const n = new Map(m);
        for (const r of rows) n.set(r.id, r);
        return n;
      });
  }, [rows]);

  const toggle = useCallback(
    (id: number) =>
      setSelected((s) => {
        const n = new Set(s);
        if (n.has(id)) n.delete(id);
        else n.add(id);
        return n;
      }),
    [],
  );

  const columns = useQueueColumns(selected, toggle);
  // eslint-disable-next-line react-hooks/incompatible-library -- TanStack Table keeps its own state; this component is left unmemoised by the compiler
  const table = useReactTable({ data: rows, columns, getCoreRowModel: getCoreRowModel(), getRowId: (r) => String(r.id) });

  const accept = useCallback(
    async (row: QueueRow) => {
      const r = await api.post<SaveResult>(`/api/marking/${row.id}/accept`, { version: row.version });
      setMessage(
        r.ok
          ? `${row.student.name}: proposal accepted${r.data.unmarked ? `; ${r.data.unmarked} hand-marked item(s) still to mark` : ' — marked'}.`
          : `${row.student.name}: ${r.error.message}`,
      );
      mutate();
    },
    [mutate],
  );

  useQueueKeys({ rows, cursor, setCursor, regionRef, accept, toggle, open: (id) => router.push(`/marking/${id}`) });

  useEffect(() => {
    tableRef.current?.querySelector<HTMLElement>(`[data-row="${cursor}"]`)?.scrollIntoView({ block: 'nearest' });
  }, [cursor]);

  const release = async () => {
    setConfirming(false);
    const ids = [...selected];
    if (await releaseSelected(ids, setMessage)) setSelected(new Set());
    mutate();
  };

  return (
    <div>
      <QueueFilters f={f} set={set} practicals={practicals} cohorts={cohorts} />

      <div className="mb-3 flex flex-wrap items-center gap-3">
        <button type="button" className="btn" disabled={selected.size === 0} onClick={() => setConfirming(true)}>
          Release selected ({selected.size})…
        </button>
        <button
          type="button"
          className="btn-quiet"
          onClick={() => setSelected(new Set(rows.filter((r) => r.status === 'marked').map((r) => r.id)))}
        >
          Select all marked on this page
        </button>
        <p className="text-sm text-ink-soft" aria-live="polite" role="status">
          {isLoading ? 'Loading…' : data ? `${data.total.toLocaleString('en-GB')}${data.totalExact ? '' : ' or more'} submission(s)` : ''}
        </p>
      </div>
      <p className="mb-3 text-sm" aria-live="polite" role="status" data-testid="queue-message">
        {message}
      </p>
      {error && (
        <p className="error-text" role="alert">
          {error.message}
        </p>
      )}

      <div
        ref={regionRef}
        className="card overflow-x-auto p-0"
        tabIndex={0}
        role="region"
        aria-label="Submissions"
        aria-describedby="queue-keys"
      >
        <QueueTable table={table} tableRef={tableRef} cursor={cursor} setCursor={setCursor} empty={rows.length === 0 && !isLoading} />
      </div>

      <ReleaseDialog
        open={confirming}
        selected={selected}
        known={known}
        onCancel={() => setConfirming(false)}
        onConfirm={() => void release()}
      />

      {data && (data.pages > 1 || data.next || data.prev) && (
        <nav className="mt-3 flex items-center gap-2" aria-label="Pages">
          <button
            type="button"
            className="btn-quiet"
            disabled={!data.prev}
            onClick={() => setF((o) => ({ ...o, page: Math.max(1, o.page - 1), before: data.prev ?? undefined, after: undefined }))}
          >
            Previous page
          </button>
          <span className="text-sm">
            Page {data.page}
            {data.totalExact ? ` of ${data.pages}` : ''}
          </span>
          <button
            type="button"
            className="btn-quiet"
            disabled={!data.next}
            onClick={() => setF((o) => ({ ...o, page: o.page + 1, after: data.next ?? undefined, before: undefined }))}
          >
            Next page
          </button>
        </nav>
      )}
    </div>
  );
}

/**
 * Releases the selection; the server reports each release as it happens (one JSON line each), then
 * the summary. Says what happened through `say`; true when the release ran (some may be refused).
 */
async function releaseSelected(ids: number[], say: (message: string) => void): Promise<boolean> {
  say(`Releasing ${ids.length} submission(s)…`);
  const r = await postStream<ReleaseSummary, ReleaseProgress>(
    '/api/release',
    { submissionIds: ids },
    {
      isProgress: (m): m is ReleaseProgress => typeof (m as ReleaseProgress).done === 'number',
      onProgress: (m) => say(`Releasing… ${m.done} of ${m.total} done.`),
      incomplete: 'The release stopped before it finished; reload to see what was released.',
    },
  );
  if (!r.ok) {
    say(`Release refused: ${r.error.message}`);
    return false;
  }
  const failed = r.data.results.filter((x) => !x.ok);
  say(
    `Released ${r.data.released} of ${ids.length}; feedback e-mails queued.${failed.length ? ` Not released: ${failed.map((x) => `#${x.submissionId} (${x.message})`).join(', ')}` : ''}`,
  );
  return true;
}

function useQueueColumns(selected: Set<number>, toggle: (id: number) => void) {
  return useMemo(
    () => [
      col.display({
        id: 'select',
        header: () => <span className="sr-only">Select</span>,
        cell: ({ row }) => (
          <input
            type="checkbox"
            aria-label={`Select ${row.original.student.name}`}
            checked={selected.has(row.original.id)}
            onChange={() => toggle(row.original.id)}
          />
        ),
      }),
      col.accessor((r) => r.student.name, {
        id: 'student',
        header: 'Student',
        cell: ({ row }) => <a href={`/marking/${row.original.id}`}>{row.original.student.name}</a>,
      }),
      col.accessor((r) => r.practical.title, { id: 'practical', header: 'Practical' }),
      col.accessor((r) => r.cohort.name, { id: 'cohort', header: 'Cohort' }),
      col.accessor('status', { header: 'Status', cell: (c) => STATUS_LABEL[c.getValue()] ?? c.getValue() }),
      col.display({ id: 'flags', header: 'Flags', cell: ({ row }) => <Flags row={row.original} /> }),
      col.accessor('submittedAt', {
        header: 'Submitted',
        cell: (c) => (c.getValue() ? new Date(c.getValue()!).toLocaleString('en-GB', { dateStyle: 'short', timeStyle: 'short' }) : '—'),
      }),
      col.display({
        id: 'marks',
        header: () => <span className="block text-right">Proposed / awarded</span>,
        cell: ({ row }) => (
          <span className="num block text-right">
            {row.original.proposedTotal ?? '—'} / {row.original.awardedTotal ?? '—'}{' '}
            <span className="text-ink-soft">of {row.original.maxTotal ?? '—'}</span>
          </span>
        ),
      }),
      col.accessor('delivery', { header: 'E-mail', cell: (c) => c.getValue() ?? '—' }),
    ],
    [selected, toggle],
  );
}

function Flags({ row }: { row: QueueRow }) {
  return (
    <span className="flex flex-wrap gap-1">
      {(Object.keys(row.flags) as (keyof QueueRow['flags'])[])
        .filter((k) => row.flags[k])
        .map((k) => (
          <span
            key={k}
            className={`rounded px-1 text-xs ${k === 'outside' ? 'bg-verdict-outside-bg text-verdict-outside' : 'bg-paper-sunk text-ink'}`}
            data-flag={k}
          >
            <span aria-hidden="true">{k === 'outside' ? '✗ ' : '⚑ '}</span>
            {k === 'slip' && row.summary.slips.length
              ? `${FLAG_LABEL[k]}: ${row.summary.slips.map((s) => s.title).join('; ')}`
              : FLAG_LABEL[k]}
          </span>
        ))}
    </span>
  );
}

/** The queue's keys, listened to on the window so they work wherever focus is outside a control. */
function useQueueKeys({
  rows,
  cursor,
  setCursor,
  regionRef,
  accept,
  toggle,
  open,
}: {
  rows: QueueRow[];
  cursor: number;
  setCursor: React.Dispatch<React.SetStateAction<number>>;
  regionRef: React.RefObject<HTMLDivElement | null>;
  accept: (row: QueueRow) => void;
  toggle: (id: number) => void;
  open: (id: number) => void;
}) {
  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      const t = e.target as HTMLElement;
      if (['INPUT', 'SELECT', 'TEXTAREA', 'BUTTON'].includes(t.tagName)) {
        // Escape leaves a filter or button for the table, where the queue keys work again.
        if (e.key === 'Escape') regionRef.current?.focus();
        return;
      }
      if (e.metaKey || e.ctrlKey || e.altKey) return;
      // Enter on a focused link follows that link; the row's own focus has already moved the cursor there.
      if (e.key === 'Enter' && t.tagName === 'A') return;
      const row = rows[cursor];
      if (e.key === 'j' || e.key === 'ArrowDown') {
        e.preventDefault();
        setCursor((c) => Math.min(rows.length - 1, c + 1));
      } else if (e.key === 'k' || e.key === 'ArrowUp') {
        e.preventDefault();
        setCursor((c) => Math.max(0, c - 1));
      } else if (e.key === 'Enter' && row) {
        open(row.id);
      } else if (e.key === 'a' && row) {
        accept(row);
      } else if (e.key === 'r' && row) {
        window.open(`/api/marking/${row.id}/report`, '_blank', 'noopener');
      } else if (e.key === 'x' && row) {
        toggle(row.id);
      }
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [rows, cursor, setCursor, regionRef, accept, toggle, open]);
}

function QueueFilters({
  f,
  set,
  practicals,
  cohorts,
}: {
  f: Filters;
  set: (patch: Partial<Filters>) => void;
  practicals: { id: number; title: string }[];
  cohorts: { id: number; name: string }[];
}) {
  return (
    <form className="card mb-4 grid grid-cols-2 gap-3 md:grid-cols-6" onSubmit={(e) => e.preventDefault()} aria-label="Filter the queue">
      <Field id="q-practical" label="Practical">
        <select className="field" value={f.practicalId} onChange={(e) => set({ practicalId: e.target.value })}>
          <option value="">All</option>
          {practicals.map((p) => (
            <option key={p.id} value={p.id}>
              {p.title}
            </option>
          ))}
        </select>
      </Field>
      <Field id="q-cohort" label="Cohort">
        <select className="field" value={f.cohortId} onChange={(e) => set({ cohortId: e.target.value })}>
          <option value="">All</option>
          {cohorts.map((c) => (
            <option key={c.id} value={c.id}>
              {c.name}
            </option>
          ))}
        </select>
      </Field>
      <Field id="q-status" label="Status">
        <select className="field" value={f.status} onChange={(e) => set({ status: e.target.value })}>
          <option value="">All</option>
          {QUEUE_STATUSES.map((s) => (
            <option key={s} value={s}>
              {STATUS_LABEL[s]}
            </option>
          ))}
        </select>
      </Field>
      <Field id="q-flag" label="Flag">
        <select className="field" value={f.flag} onChange={(e) => set({ flag: e.target.value })}>
          <option value="">Any</option>
          {QUEUE_FLAGS.map((s) => (
            <option key={s} value={s}>
              {FLAG_LABEL[s]}
            </option>
          ))}
        </select>
      </Field>
      <Field id="q-sort" label="Sort by">
        <select className="field" value={f.sort} onChange={(e) => set({ sort: e.target.value })}>
          {QUEUE_SORTS.map((s) => (
            <option key={s} value={s}>
              {SORT_LABEL[s]}
            </option>
          ))}
        </select>
      </Field>
      <Field id="q-dir" label="Order">
        <select className="field" value={f.dir} onChange={(e) => set({ dir: e.target.value })}>
          <option value="asc">Ascending</option>
          <option value="desc">Descending</option>
        </select>
      </Field>
    </form>
  );
}

function QueueTable({
  table,
  tableRef,
  cursor,
  setCursor,
  empty,
}: {
  table: Table<QueueRow>;
  tableRef: React.RefObject<HTMLTableSectionElement | null>;
  cursor: number;
  setCursor: (i: number) => void;
  empty: boolean;
}) {
  return (
    <table className="data-table" aria-describedby="queue-keys">
      <thead>
        {table.getHeaderGroups().map((g) => (
          <tr key={g.id}>
            {g.headers.map((h) => (
              <th key={h.id} scope="col">
                {flexRender(h.column.columnDef.header, h.getContext())}
              </th>
            ))}
          </tr>
        ))}
      </thead>
      <tbody ref={tableRef}>
        {table.getRowModel().rows.map((row, i) => (
          <tr
            key={row.id}
            data-row={i}
            data-submission={row.original.id}
            aria-current={i === cursor ? 'true' : undefined}
            className={i === cursor ? 'bg-accent-soft outline outline-2 outline-accent' : ''}
            onClick={() => setCursor(i)}
            onFocus={() => setCursor(i)}
          >
            {row.getVisibleCells().map((c) => (
              <td key={c.id}>{flexRender(c.column.columnDef.cell, c.getContext())}</td>
            ))}
          </tr>
        ))}
        {empty && (
          <tr>
            <td colSpan={table.getAllLeafColumns().length} className="text-ink-soft">
              Nothing matches these filters.
            </td>
          </tr>
        )}
      </tbody>
    </table>
  );
}

function ReleaseDialog({
  open,
  selected,
  known,
  onCancel,
  onConfirm,
}: {
  open: boolean;
  selected: Set<number>;
  known: Map<number, QueueRow>;
  onCancel: () => void;
  onConfirm: () => void;
}) {
  return (
    <ConfirmDialog
      open={open}
      title={`Release feedback to ${selected.size} student${selected.size === 1 ? '' : 's'}?`}
      confirmLabel={`Release ${selected.size} now`}
      onCancel={onCancel}
      onConfirm={onConfirm}
    >
      <p>
        For each, the feedback PDF is written and e-mailed to the student, who can then also download it. Released feedback cannot be
        withdrawn.
      </p>
      <ul className="max-h-56 list-disc overflow-y-auto pl-5" data-testid="release-list">
        {[...selected].map((id) => {
          const r = known.get(id);
          return (
            <li key={id}>
              {r ? (
                <>
                  {r.student.name}{' '}
                  <span className="text-ink-soft">
                    ({r.student.email}) — {r.practical.title}, total {r.awardedTotal ?? '—'} of {r.maxTotal ?? '—'}
                    {r.status !== 'marked' ? `; ${STATUS_LABEL[r.status] ?? r.status}, will be refused` : ''}
                  </span>
                </>
              ) : (
                `Submission ${id}`
              )}
            </li>
          );
        })}
      </ul>
    </ConfirmDialog>
  );
}
