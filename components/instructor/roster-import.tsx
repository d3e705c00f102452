'use client';
import { useState } from 'react';
import type { RosterPreview, RosterRow } from '@/lib/instructor/roster';
import { send } from './api';

const STATUS: Record<RosterRow['status'], { word: string; symbol: string; cls: string }> = {
  new: { word: 'New', symbol: '+', cls: 'text-verdict-within bg-verdict-within-bg' },
  enrolled: { word: 'Already enrolled', symbol: '=', cls: 'text-verdict-unchecked bg-verdict-unchecked-bg' },
  invalid: { word: 'Invalid', symbol: '✗', cls: 'text-verdict-outside bg-verdict-outside-bg' },
};

/** Upload a roster CSV, see every row classified, then import all of it (or nothing). */
export function RosterImport({ courseId, onImported }: { courseId: number; onImported: () => void }) {
  const [file, setFile] = useState<File | null>(null);
  const [preview, setPreview] = useState<RosterPreview | null>(null);
  const [msg, setMsg] = useState<{ ok: boolean; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  async function call(mode: 'preview' | 'import') {
    if (!file) return;
    setBusy(true);
    setMsg(null);
    const r = await send<RosterPreview & { created?: number; enrolled?: number; invited?: number }>('POST', `/api/courses/${courseId}/roster?mode=${mode}`, undefined, { body: file, type: 'text/csv' });
    setBusy(false);
    if (!r.ok) {
      setPreview(null);
      return setMsg({ ok: false, text: r.data.error ?? 'The file was refused.' });
    }
    setPreview(r.data);
    if (mode === 'import') {
      setMsg({ ok: true, text: `Imported: ${r.data.enrolled} enrolled (${r.data.created} new accounts, ${r.data.invited} invitations sent); ${r.data.counts.enrolled} were already enrolled.` });
      onImported();
    } else {
      const c = r.data.counts;
      setMsg(c.invalid ? { ok: false, text: `${c.invalid} invalid row(s): fix them in the file and preview again. Nothing has been written.` } : { ok: true, text: `Ready: ${c.new} new, ${c.enrolled} already enrolled. Nothing has been written yet.` });
    }
  }

  return (
    <section aria-labelledby="roster" className="card">
      <h2 id="roster" className="mb-1">Roster import</h2>
      <p className="hint mb-3">A CSV file (UTF-8, at most 1 MB) with exactly the columns name, email, student_number, cohort. The preview writes nothing; the import writes every row or none.</p>
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="roster-file" className="label">Roster file</label>
          <input id="roster-file" type="file" accept=".csv,text/csv" className="field" onChange={(e) => { setFile(e.target.files?.[0] ?? null); setPreview(null); setMsg(null); }} />
        </div>
        <button type="button" className="btn-quiet" disabled={!file || busy} onClick={() => call('preview')}>Preview</button>
        <button type="button" className="btn" disabled={!file || busy || !preview || preview.counts.invalid > 0 || preview.counts.new === 0} onClick={() => call('import')}>Import</button>
      </div>
      <p aria-live="polite" className={msg?.ok ? 'mt-2 text-sm text-verdict-within' : 'error-text'}>{msg ? `${msg.ok ? '✓' : '✗'} ${msg.text}` : ''}</p>
      {preview && (
        <div className="mt-3 overflow-x-auto">
          <table className="data-table" aria-label="Roster preview">
            <thead>
              <tr><th className="num">Line</th><th>Status</th><th>Name</th><th>E-mail</th><th>Student number</th><th>Cohort</th><th>Reason / note</th></tr>
            </thead>
            <tbody>
              {preview.rows.map((r) => (
                <tr key={r.line}>
                  <td className="num">{r.line}</td>
                  <td><span className={`inline-flex gap-1 rounded px-2 py-0.5 text-sm font-bold ${STATUS[r.status].cls}`}><span aria-hidden="true">{STATUS[r.status].symbol}</span>{STATUS[r.status].word}</span></td>
                  <td>{r.name}</td><td>{r.email}</td><td className="num">{r.studentNumber}</td><td>{r.cohort}</td>
                  <td>{[r.reason, ...(r.notes ?? []), r.status === 'new' ? 'Will be enrolled; invited by e-mail if they have not set a password yet.' : ''].filter(Boolean).join(' ')}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}
