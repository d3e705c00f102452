import { verdictInfo } from '@/lib/marking/verdict';

/** Verdict as word + symbol + colour (never colour alone). */
export function VerdictBadge({ verdict }: { verdict: string | null | undefined }) {
  const v = verdictInfo(verdict);
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap rounded px-1.5 py-0.5 text-xs font-bold ${v.className}`}>
      <span aria-hidden="true">{v.symbol}</span>
      {v.word}
    </span>
  );
}
