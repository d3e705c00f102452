import type { Verdict } from '@/lib/grading/tolerance';

/** A verdict as word, symbol and colour together (never colour alone). */
const LOOK: Record<Verdict, { word: string; symbol: string; cls: string }> = {
  within: { word: 'Within tolerance', symbol: '✓', cls: 'text-verdict-within bg-verdict-within-bg' },
  partial: { word: 'Partial credit', symbol: '◐', cls: 'text-verdict-partial bg-verdict-partial-bg' },
  outside: { word: 'Outside tolerance', symbol: '✗', cls: 'text-verdict-outside bg-verdict-outside-bg' },
  'not-checked': { word: 'Not checked', symbol: '–', cls: 'text-verdict-unchecked bg-verdict-unchecked-bg' },
};

export function VerdictLabel({ verdict }: { verdict: Verdict }) {
  const l = LOOK[verdict];
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap rounded px-2 py-0.5 text-sm font-bold ${l.cls}`}>
      <span aria-hidden="true">{l.symbol}</span> {l.word}
    </span>
  );
}
