/**
 * The stored analysis of a submission's spectra, ready to show: on the marking screen and in the
 * feedback PDF (the third comparison, "from your spectrum", with its own verdict words), from the
 * check summary alone.
 */
import { formatNumber, fromSI, isQuantityKey, QUANTITIES, speciesDisplay } from '@/lib/grading';
import type { BandMatch, FromSpectrumRow, StoredAnalysis } from './spectrum-analysis';

export type SpectrumVerdict = 'within' | 'partial' | 'outside' | 'not-checked';

/** The third comparison's own verdicts: word + symbol + colour (the verdict tokens' colours). */
export const SPECTRUM_VERDICT: Record<SpectrumVerdict, { word: string; symbol: string; className: string; rgb: [number, number, number] }> =
  {
    within: {
      word: 'agrees with the spectrum',
      symbol: '✓',
      className: 'text-verdict-within bg-verdict-within-bg',
      rgb: [0x1d / 255, 0x6a / 255, 0x3b / 255],
    },
    partial: {
      word: 'near the spectrum',
      symbol: '◐',
      className: 'text-verdict-partial bg-verdict-partial-bg',
      rgb: [0x7d / 255, 0x4e / 255, 0],
    },
    outside: {
      word: 'differs from the spectrum',
      symbol: '✗',
      className: 'text-verdict-outside bg-verdict-outside-bg',
      rgb: [0xa3 / 255, 0x26 / 255, 0x1c / 255],
    },
    'not-checked': {
      word: 'not compared',
      symbol: '–',
      className: 'text-verdict-unchecked bg-verdict-unchecked-bg',
      rgb: [0x4a / 255, 0x53 / 255, 0x61 / 255],
    },
  };

export interface FromSpectrumDisplayRow {
  label: string;
  reported: string;
  fromSpectrum: string;
  deviation: string;
  verdict: SpectrumVerdict;
  basis: string;
}

export interface SpectrumSampleDisplay {
  label: string;
  file: string | null;
  message: string | null;
  lineShape: string | null;
  bands: { label: string; status: string; lines: number; constants: string | null; warnings: string[] }[];
  calibration: string | null;
  unassigned: string | null;
  problems: string[];
}

export interface SpectrumAnalysisView {
  /** The practical shows the third comparison. */
  comparison: { legend: string; rows: FromSpectrumDisplayRow[] } | null;
  samples: SpectrumSampleDisplay[];
  perBand: BandMatch[];
}

function show(valueSI: number, key: string, signed = false, digits = 6): string {
  const q = isQuantityKey(key) ? key : 'bandCentre';
  const info = QUANTITIES[q];
  const r = fromSI(valueSI, info.displayUnit, info.dimension);
  const [v, unit] = r.ok ? [r.value, r.unit] : [valueSI, info.siUnit];
  const sign = signed && v > 0 ? '+' : '';
  return `${sign}${formatNumber(v, digits)}${unit ? ` ${unit}` : ''}`;
}

function labelOf(key: string, species: string): string {
  if (key === 'overtone') return `First overtone band centre (${speciesDisplay(species)})`;
  return `${isQuantityKey(key) ? QUANTITIES[key].label : key} (${speciesDisplay(species)})`;
}

/** A relative deviation as a percentage with a typographic minus and two significant figures when small. */
function percent(rel: number): string {
  const p = rel * 100;
  const text = Math.abs(p) >= 0.1 ? Math.abs(p).toFixed(2) : Math.abs(p) === 0 ? '0' : Number(Math.abs(p).toPrecision(2)).toString();
  return `${p < 0 ? '−' : p > 0 ? '+' : ''}${text} %`;
}

const est = (e: { value: number; stdError: number } | undefined, digits: number) =>
  e ? `${e.value.toFixed(digits)} ± ${e.stdError.toFixed(digits)}` : null;

const STATUS: Record<string, string> = {
  fitted: 'found and fitted',
  'too-few-lines': 'too few lines to fit',
  'not-found': 'not found',
  'outside-range': 'outside the recorded range',
  unresolved: 'not separated from its isotope partner',
};

function sampleDisplay(s: { label: string; originalName: string | null; analysis: StoredAnalysis | null }): SpectrumSampleDisplay {
  const a = s.analysis;
  if (!a)
    return {
      label: s.label,
      file: s.originalName,
      message: s.originalName ? 'Not analysed.' : 'No spectrum was uploaded.',
      lineShape: null,
      bands: [],
      calibration: null,
      unassigned: null,
      problems: [],
    };
  if (!a.ok)
    return {
      label: s.label,
      file: s.originalName,
      message: a.message,
      lineShape: null,
      bands: [],
      calibration: null,
      unassigned: null,
      problems: [],
    };
  return {
    label: s.label,
    file: s.originalName,
    message: null,
    lineShape: `${Math.round(a.range.from)}–${Math.round(a.range.to)} cm⁻¹; line width ${a.lineShape.fwhm.toFixed(2)} cm⁻¹${a.lineShape.resolution ? ` (resolution about ${a.lineShape.resolution.toFixed(2)} cm⁻¹)` : ''}`,
    bands: a.results
      .filter((r) => r.status !== 'outside-range')
      .map((r) => ({
        label: r.label,
        status: STATUS[r.status] ?? r.status,
        lines: r.lines.length,
        constants: r.fit
          ? `ν̃₀ ${est(r.fit.nu0, 3)}, B₀ ${est(r.fit.B0, 4)}, B${r.band === 'fundamental' ? '₁' : '₂'} ${est(r.fit.Bupper, 4)}, αₑ ${est(r.fit.alphaE, 4)} cm⁻¹${r.fit.re ? `, rₑ ${est(r.fit.re, 4)} Å` : ''}; ${r.fit.model === 'cubic' ? 'with' : 'without'} D; rms ${r.fit.rms.toFixed(4)} cm⁻¹`
          : null,
        warnings: r.warnings,
      })),
    calibration: a.calibration?.detected ? a.calibration.message : null,
    unassigned: a.unassigned.length
      ? `${a.unassigned.length} line${a.unassigned.length === 1 ? '' : 's'} belong to no band of the named molecules (e.g. ${a.unassigned
          .slice(0, 3)
          .map((u) => `${u.wavenumber.toFixed(2)} cm⁻¹`)
          .join(', ')}).`
      : null,
    problems: a.problems.filter((p) => !/outside the recorded range/.test(p)),
  };
}

/** From the stored check summary (unknown shape, older summaries have none of this). */
export function spectrumAnalysisView(summary: unknown): SpectrumAnalysisView | null {
  if (!summary || typeof summary !== 'object') return null;
  const s = summary as {
    spectra?: { samples: { label: string; originalName: string | null; analysis: StoredAnalysis | null }[]; perBand: BandMatch[] };
    fromSpectrum?: { legend: string; rows: FromSpectrumRow[] } | null;
  };
  if (!s.spectra) return null;
  const comparison = s.fromSpectrum
    ? {
        legend: s.fromSpectrum.legend,
        rows: s.fromSpectrum.rows.map((r) => ({
          label: labelOf(r.key, r.species),
          reported: show(r.reportedSI, r.key),
          fromSpectrum: `${show(r.spectrumSI, r.key)}${r.spectrumErrorSI > 0 ? ` (± ${show(r.spectrumErrorSI, r.key, false, 2)})` : ''}`,
          deviation: `${show(r.deviation, r.key, true, 3)}${Number.isFinite(r.relativeDeviation) && Math.abs(r.relativeDeviation) < 10 ? ` (${percent(r.relativeDeviation)})` : ''}`,
          verdict: (r.verdict in SPECTRUM_VERDICT ? r.verdict : 'not-checked') as SpectrumVerdict,
          basis: r.basis,
        })),
      }
    : null;
  return { comparison, samples: s.spectra.samples.map(sampleDisplay), perBand: s.spectra.perBand ?? [] };
}
