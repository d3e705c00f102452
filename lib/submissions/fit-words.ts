/**
 * The band fit in words, for the student's result, the marking screen and the feedback PDF:
 * which model the check used and why, its rms, and the notices the engine raised.
 */
import { formatNumber, type FitChoiceSummary, type Notice } from '@/lib/grading';

/** Notices about the data as given (not judgements), shown to students before marks are released. */
export const DATA_NOTICE_CODES: ReadonlySet<string> = new Set(['exact-fit', 'few-lines', 'lines-far-from-band']);

const REASON: Record<FitChoiceSummary['reason'], string> = {
  requested: 'asked for',
  significant: 'the lines need it',
  'not-significant': 'the lines do not need the centrifugal term',
  exact: 'the lines fit exactly without the centrifugal term',
  'too-few-lines': 'too few lines to test the centrifugal term',
};

export function describeFit(fit: { model?: unknown; rms?: unknown; lineCount?: unknown }, choice: FitChoiceSummary | undefined): string {
  const lines = typeof fit.lineCount === 'number' ? `${fit.lineCount} lines` : 'the lines';
  const model = fit.model === 'cubic' ? 'with the centrifugal term −4Dm³' : 'without the centrifugal term';
  const rms = typeof fit.rms === 'number' ? `rms residual ${formatNumber(fit.rms, 2)} cm⁻¹` : '';
  const why: string[] = [];
  if (choice) {
    why.push(REASON[choice.reason] ?? choice.reason);
    if (choice.fTest && Number.isFinite(choice.fTest.p))
      why.push(`F-test p ${choice.fTest.p < 1e-4 ? '< 0.0001' : `= ${formatNumber(choice.fTest.p, 2)}`}`);
    if (choice.alternative)
      why.push(
        `${choice.alternative.model === 'cubic' ? 'with' : 'without'} the term: rms ${formatNumber(choice.alternative.rms, 2)} cm⁻¹`,
      );
  }
  return `Least-squares fit of ${lines} ${model}${why.length ? ` (${why.join('; ')})` : ''}${rms ? `: ${rms}` : ''}.`;
}

export function noticesOf(result: unknown): Notice[] {
  const n = (result as { notices?: unknown } | null)?.notices;
  return Array.isArray(n) ? n.filter((x): x is Notice => !!x && typeof x === 'object' && typeof (x as Notice).message === 'string') : [];
}
