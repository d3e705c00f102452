'use client';
/**
 * The line list of one isotopologue: typed, pasted from a spreadsheet or read from a CSV file,
 * read into (branch, J, wavenumber) as the student types, with "Propose assignment" for a list of
 * bare positions. `useLineLists` keeps what each list's reading found and the proposals.
 */
import { useCallback, useEffect, useState } from 'react';
import type { UseFormReturn } from 'react-hook-form';
import type { Draft } from '@/lib/schemas/submission';
import { parseLineList, formatLineListCsv, type LineListIssue } from '@/lib/linelist';

type Issues = { warnings: LineListIssue[]; errors: LineListIssue[] };
type Proposal = { text: string; count: number; unassigned: number; problems: string[] };

export function useLineLists(
  form: UseFormReturn<Draft>,
  species: { name: string }[],
  initialDraft: Draft,
  expectedRange?: { from: number; to: number },
) {
  const { setValue, getValues } = form;
  const [issues, setIssues] = useState<Record<string, Issues>>({});
  const [proposals, setProposals] = useState<Record<string, Proposal | null>>({});

  const readLines = useCallback(
    (sp: string, text: string) => {
      const parsed = parseLineList(text, { expected: expectedRange });
      setIssues((m) => ({ ...m, [sp]: { warnings: parsed.warnings, errors: parsed.errors } }));
      setValue(
        `species.${sp}.lines`,
        parsed.lines.map((l) => ({ branch: l.branch ?? null, J: l.J ?? null, wavenumber: l.wavenumber })),
        { shouldDirty: true },
      );
    },
    [expectedRange, setValue],
  );

  /** Puts text into a list and reads it, as if the student had typed it. */
  const putText = useCallback(
    (sp: string, text: string) => {
      setValue(`species.${sp}.lineText`, text, { shouldDirty: true });
      readLines(sp, text);
    },
    [readLines, setValue],
  );

  // The saved lists are read once, when the form opens (the props they come from never change).
  useEffect(() => {
    for (const s of species) {
      const t = initialDraft.species[s.name]?.lineText;
      // eslint-disable-next-line react-hooks/set-state-in-effect -- once on mount; the issues shown come from reading the saved text
      if (t) readLines(s.name, t);
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps -- once on mount: a re-read on a later render would overwrite the student's edits
  }, []);

  const propose = async (sp: string) => {
    const lines = getValues(`species.${sp}.lines`) ?? [];
    // Loaded when asked for: the assignment brings the band fit and its statistics with it.
    const { assignPeaks } = await import('@/lib/grading/assign');
    const r = assignPeaks(
      lines.map((l) => l.wavenumber),
      sp,
    );
    setProposals((m) => ({
      ...m,
      [sp]: {
        text: formatLineListCsv(r.assignments.map((a) => ({ branch: a.branch, J: a.J, wavenumber: a.wavenumber }))),
        count: r.assignments.length,
        unassigned: r.unassigned.length,
        problems: r.problems.map((p) => p.message),
      },
    }));
  };

  const accept = (sp: string) => {
    const p = proposals[sp];
    if (!p) return;
    putText(sp, p.text);
    setProposals((m) => ({ ...m, [sp]: null }));
  };
  const discard = (sp: string) => setProposals((m) => ({ ...m, [sp]: null }));

  return { issues, proposals, readLines, putText, propose, accept, discard };
}

export type LineLists = ReturnType<typeof useLineLists>;

export function LineListField({ form, sp, display, lists }: { form: UseFormReturn<Draft>; sp: string; display: string; lists: LineLists }) {
  const iss = lists.issues[sp];
  const prop = lists.proposals[sp];
  const lines = form.watch(`species.${sp}.lines`) ?? [];
  return (
    <div>
      <label className="label" htmlFor={`lines-${sp}`}>
        Line list for {display}
      </label>
      <textarea
        id={`lines-${sp}`}
        rows={8}
        className="field num"
        aria-describedby={`lines-${sp}-hint lines-${sp}-status`}
        {...form.register(`species.${sp}.lineText`, { onChange: (e) => lists.readLines(sp, e.target.value) })}
      />
      <p className="hint" id={`lines-${sp}-hint`}>
        Paste from a spreadsheet (tab- or comma-separated, with or without a header): branch, J and wavenumber in cm⁻¹ per row, or a label
        such as P(3), or just the positions.
      </p>
      <div className="mt-2 flex flex-wrap items-center gap-3">
        <label className="btn-quiet cursor-pointer" htmlFor={`linefile-${sp}`}>
          Read a CSV file…
        </label>
        <input
          id={`linefile-${sp}`}
          type="file"
          accept=".csv,.tsv,.txt,text/csv,text/plain"
          className="sr-only"
          onChange={async (e) => {
            const f = e.target.files?.[0];
            if (f) lists.putText(sp, await f.text());
          }}
        />
        <button type="button" className="btn-quiet" onClick={() => void lists.propose(sp)} disabled={lines.length === 0}>
          Propose assignment
        </button>
      </div>
      <div id={`lines-${sp}-status`} aria-live="polite" className="mt-2 text-sm">
        <p>
          {lines.length} line{lines.length === 1 ? '' : 's'} read, {lines.filter((l) => l.branch).length} assigned.
        </p>
        {iss?.errors.map((x, i) => (
          <p key={`e${i}`} className="error-text">
            {x.message}
          </p>
        ))}
        {iss?.warnings.map((x, i) => (
          <p key={`w${i}`} className="text-ink-soft">
            Check: {x.message}
          </p>
        ))}
      </div>
      {prop && <ProposalBox proposal={prop} onUse={() => lists.accept(sp)} onDiscard={() => lists.discard(sp)} />}
    </div>
  );
}

function ProposalBox({ proposal: prop, onUse, onDiscard }: { proposal: Proposal; onUse: () => void; onDiscard: () => void }) {
  return (
    <div className="mt-3 rounded border border-rule bg-paper-sunk p-3 text-sm" aria-live="polite">
      <p>
        Proposed assignment: {prop.count} lines assigned
        {prop.unassigned ? `, ${prop.unassigned} left unassigned (perhaps the other isotopologue)` : ''}. Check it against your spectrum
        before you use it.
      </p>
      {prop.problems.map((p, i) => (
        <p key={i} className="error-text">
          {p}
        </p>
      ))}
      <pre className="num mt-2 max-h-40 overflow-auto">{prop.text}</pre>
      <div className="mt-2 flex gap-2">
        <button type="button" className="btn" onClick={onUse} disabled={prop.count === 0}>
          Use this assignment
        </button>
        <button type="button" className="btn-quiet" onClick={onDiscard}>
          Discard
        </button>
      </div>
    </div>
  );
}
