/**
 * Display scale for relative deviations (percent): symmetric logarithmic, linear within ±0.1 %,
 * so rounding-level scatter and slip-sized outliers (×4π², ×10⁴) fit on one axis. Only for
 * drawing; every figure shown as text is the plain value.
 */
import { QUANTITIES } from '@/lib/grading/quantities';
import { isotopologueText, percentText } from '@/lib/display';

export const SYMLOG_LINEAR = 0.1;

export function symlog(percent: number): number {
  return Math.sign(percent) * Math.log10(1 + Math.abs(percent) / SYMLOG_LINEAR);
}

export const SYMLOG_TICKS = [-100, -10, -1, 0, 1, 10, 100, 1000];

export function tickLabel(percent: number): string {
  if (percent === 0) return '0';
  return `${percent < 0 ? '−' : '+'}${Math.abs(percent)} %`;
}

/** A percentage as text: Unicode minus, no e-notation, a no-break space before % (lib/display.ts). */
export function formatPercent(v: number | null | undefined, digits = 2): string {
  return percentText(v, { digits });
}

/** "Force constant k (H³⁵Cl)". */
export function quantityLabel(key: string, species: string): string {
  const info = (QUANTITIES as Record<string, { label: string } | undefined>)[key];
  return `${info?.label ?? key} (${isotopologueText(species)})`;
}
