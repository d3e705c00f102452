import type { Verdict } from '@/lib/grading/tolerance';

const STYLE: Record<Verdict, { word: string; symbol: string; cls: string }> = {
  within: { word: 'within tolerance', symbol: '✓', cls: 'text-verdict-within bg-verdict-within-bg' },
  partial: { word: 'partial credit', symbol: '◐', cls: 'text-verdict-partial bg-verdict-partial-bg' },
  outside: { word: 'outside tolerance', symbol: '✗', cls: 'text-verdict-outside bg-verdict-outside-bg' },
  'not-checked': { word: 'not checked', symbol: '–', cls: 'text-verdict-unchecked bg-verdict-unchecked-bg' },
};

/** A verdict as word + symbol + colour, never colour alone. */
export function VerdictTag({ verdict }: { verdict: Verdict }) {
  const s = STYLE[verdict] ?? STYLE['not-checked'];
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap rounded px-1.5 py-0.5 text-xs font-bold ${s.cls}`}>
      <span aria-hidden="true">{s.symbol}</span>
      {s.word}
    </span>
  );
}
