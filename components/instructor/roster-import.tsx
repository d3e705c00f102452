'use client';
import { useState } from 'react';
import type { RosterPreview, RosterRow } from '@/lib/instructor/roster';
import { TableScroll } from '@/components/ui/table-scroll';
import { api } from '@/lib/api-client';
import { Field } from '@/components/ui/field';

const STATUS: Record<RosterRow['status'], { word: string; symbol: string; cls: string }> = {
  new: { word: 'New', symbol: '+', cls: 'text-verdict-within bg-verdict-within-bg' },
  enrolled: { word: 'Already enrolled', symbol: '=', cls: 'text-verdict-unchecked bg-verdict-unchecked-bg' },
  invalid: { word: 'Invalid', symbol: '✗', cls: 'text-verdict-outside bg-verdict-outside-bg' },
};

type OpenCohort = { id: number; name: string; term: string };

/**
 * Upload a roster CSV, choose the cohort it goes into (or let the file's cohort and term columns
 * say), see every row classified with all its problems, then import all of it (or nothing).
 */
export function RosterImport({ courseId, cohorts, onImported }: { courseId: number; cohorts: OpenCohort[]; onImported: () => void }) {
  const [file, setFile] = useState<File | null>(null);
  const [target, setTarget] = useState('');
  const [preview, setPreview] = useState<RosterPreview | null>(null);
  const [msg, setMsg] = useState<{ ok: boolean; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  async function call(mode: 'preview' | 'import') {
    if (!file) return;
    setBusy(true);
    setMsg(null);
    const r = await api.post<RosterPreview & { created?: number; enrolled?: number; invited?: number }>(
      `/api/courses/${courseId}/roster?mode=${mode}${target ? `&cohortId=${target}` : ''}`,
      { raw: file, type: 'text/csv' },
    );
    setBusy(false);
    if (!r.ok) {
      setPreview(null);
      return setMsg({ ok: false, text: r.error.message });
    }
    setPreview(r.data);
    if (mode === 'import') {
      setMsg({
        ok: true,
        text: `Imported: ${r.data.enrolled} enrolled (${r.data.created} new accounts, ${r.data.invited} invitations sent); ${r.data.counts.enrolled} were already enrolled.`,
      });
      onImported();
    } else {
      const c = r.data.counts;
      setMsg(
        c.invalid
          ? {
              ok: false,
              text: `${c.invalid} invalid row(s): fix them in the file (or choose the cohort) and preview again. Nothing has been written.`,
            }
          : { ok: true, text: `Ready: ${c.new} new, ${c.enrolled} already enrolled. Nothing has been written yet.` },
      );
    }
  }

  const reset = () => {
    setPreview(null);
    setMsg(null);
  };

  return (
    <section aria-labelledby="roster" className="card">
      <h2 id="roster" className="mb-1">
        Roster import
      </h2>
      <p className="hint mb-3" id="roster-hint">
        A CSV file (UTF-8, at most 1 MB) with the columns name, email, student_number, and optionally cohort and term. Choose the cohort
        here, or let each row’s cohort (and term) say where it goes. The preview writes nothing; the import writes every row or none.
      </p>
      <SharedNames cohorts={cohorts} />
      <div className="flex flex-wrap items-end gap-3">
        <Field id="roster-cohort" label="Import into" className="min-w-0 max-w-full">
          <select
            className="field"
            value={target}
            onChange={(e) => {
              setTarget(e.target.value);
              reset();
            }}
          >
            <option value="">The cohort named in each row</option>
            {cohorts.map((c) => (
              <option key={c.id} value={c.id}>
                {c.name} ({c.term})
              </option>
            ))}
          </select>
        </Field>
        <Field id="roster-file" label="Roster file" className="min-w-0 max-w-full">
          <input
            type="file"
            accept=".csv,text/csv"
            className="field max-w-full"
            aria-describedby="roster-hint"
            onChange={(e) => {
              setFile(e.target.files?.[0] ?? null);
              reset();
            }}
          />
        </Field>
        <button type="button" className="btn-quiet" disabled={!file || busy} onClick={() => call('preview')}>
          Preview
        </button>
        <button
          type="button"
          className="btn"
          disabled={!file || busy || !preview || preview.counts.invalid > 0 || preview.counts.new === 0}
          onClick={() => call('import')}
        >
          Import
        </button>
      </div>
      <p aria-live="polite" className={msg?.ok ? 'mt-2 text-sm text-verdict-within' : 'error-text'}>
        {msg ? `${msg.ok ? '✓' : '✗'} ${msg.text}` : ''}
      </p>
      {preview && <RosterPreviewTable preview={preview} />}
    </section>
  );
}

/** Open cohorts that share a name cannot be told apart by a cohort column alone: say so before the instructor uploads. */
function SharedNames({ cohorts }: { cohorts: OpenCohort[] }) {
  const names = cohorts.map((c) => c.name.toLowerCase());
  const shared = [...new Set(names.filter((n, i) => names.indexOf(n) !== i))];
  if (shared.length === 0) return null;
  return (
    <p className="mb-3 text-sm" role="note">
      <span aria-hidden="true">⚑ </span>Two open cohorts share a name (
      {shared.map((n) => `“${cohorts.find((c) => c.name.toLowerCase() === n)!.name}”`).join(', ')}): choose the cohort here, or give a term
      column in the file.
    </p>
  );
}

/** Every row of the file as the server classified it: status (word, symbol and colour), what it read, and each problem. */
function RosterPreviewTable({ preview }: { preview: RosterPreview }) {
  return (
    <TableScroll label="Roster preview, scrollable" className="mt-3">
      <table className="data-table" aria-label="Roster preview">
        <thead>
          <tr>
            <th className="num">Line</th>
            <th>Status</th>
            <th>Name</th>
            <th>E-mail</th>
            <th>Student number</th>
            <th>Cohort</th>
            <th>Problems and notes</th>
          </tr>
        </thead>
        <tbody>
          {preview.rows.map((r) => (
            <tr key={r.line} data-status={r.status}>
              <td className="num">{r.line}</td>
              <td>
                <span className={`inline-flex gap-1 whitespace-nowrap rounded px-2 py-0.5 text-sm font-bold ${STATUS[r.status].cls}`}>
                  <span aria-hidden="true">{STATUS[r.status].symbol}</span>
                  {STATUS[r.status].word}
                </span>
              </td>
              <td>{r.name}</td>
              <td>{r.email}</td>
              <td className="num">{r.studentNumber}</td>
              <td className="whitespace-nowrap">{r.cohort}</td>
              <td className="min-w-[16rem]">
                {r.reasons?.length ? (
                  <ul className="list-disc space-y-0.5 pl-4" data-testid="row-problems">
                    {r.reasons.map((x, i) => (
                      <li key={i}>{x}</li>
                    ))}
                  </ul>
                ) : null}
                {[...(r.notes ?? []), r.status === 'new' ? 'Will be enrolled; invited by e-mail if they have not set a password yet.' : '']
                  .filter(Boolean)
                  .join(' ')}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </TableScroll>
  );
}
