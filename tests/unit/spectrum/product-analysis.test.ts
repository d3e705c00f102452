/**
 * The bookkeeping around the spectrum analysis in the product (lib/submissions/spectrum-analysis.ts):
 * which spectra a practical takes, a student's lines counted per band, and the third comparison's
 * verdicts. Band positions and constants: Huber & Herzberg via NIST WebBook (from memory), through
 * the published formulas in tests/helpers/diatomic-lines.ts; the analyses are made from synthetic
 * spectra of the project's generator.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { analyseSpectrum } from '@/lib/spectrum/analyse';
import {
  compareWithAnalysis,
  matchByBand,
  moleculeOf,
  samplesOf,
  storeAnalysis,
  type StoredAnalysis,
} from '@/lib/submissions/spectrum-analysis';
import { bandLines, expectedBand, record } from '../../helpers/diatomic-lines';

const hcl = [...bandLines('H35Cl', 1), ...bandLines('H37Cl', 1)];
let stored: StoredAnalysis;

beforeAll(() => {
  const spectrum = record({ lines: hcl, from: 2500, to: 3200, step: 0.125, resolution: 0.5, noise: 3e-4, seed: 5 });
  const sample = { key: 'cell', label: 'Spectrum', molecules: ['HCl', 'DCl'], bands: ['fundamental' as const] };
  stored = storeAnalysis(analyseSpectrum(spectrum, { species: sample.molecules, bands: sample.bands }), 7, sample);
});

describe('samples of a practical', () => {
  it('names the molecule of each isotopologue and defaults to one spectrum holding them all', () => {
    expect(['H35Cl', 'D35Cl', '12C16O', 'H79Br', 'D37Cl'].map(moleculeOf)).toEqual(['HCl', 'DCl', 'CO', 'HBr', 'DCl']);
    expect(samplesOf({ species: ['H35Cl', 'H37Cl', 'D35Cl'] }, false)).toEqual([
      { key: 'cell', label: 'Spectrum', molecules: ['HCl', 'DCl'], bands: ['fundamental'] },
    ]);
    expect(samplesOf({ species: ['12C16O'] }, true)[0].bands).toEqual(['fundamental', 'overtone']);
    const set = [{ key: 'hcl', label: 'HCl cell', molecules: ['HCl'], bands: ['fundamental' as const] }];
    expect(samplesOf({ species: ['H35Cl'], spectrumSamples: set }, true)).toEqual(set);
  });
});

describe('a student’s lines per isotopologue and band', () => {
  it('matches lines of a covered band, and says when a band lies outside the uploaded range', () => {
    const lines = [
      ...hcl
        .filter((l) => l.species === 'H35Cl' && l.J <= 8)
        .map((l) => ({ species: 'H35Cl', branch: l.branch, J: l.J, wavenumber: Math.round(l.wavenumber * 100) / 100 })),
      // One misread position, 1.5 cm⁻¹ off: not a line of the spectrum.
      {
        species: 'H35Cl',
        branch: 'R' as const,
        J: 9,
        wavenumber: Math.round(hcl.find((l) => l.species === 'H35Cl' && l.branch === 'R' && l.J === 9)!.wavenumber * 100) / 100 + 1.5,
      },
      // D³⁵Cl lines near 2091 cm⁻¹ (Huber & Herzberg): the file starts at 2500.
      ...bandLines('D35Cl', 1)
        .filter((l) => l.J <= 3)
        .map((l) => ({ species: 'D35Cl', branch: l.branch, J: l.J, wavenumber: l.wavenumber })),
    ];
    const rows = matchByBand(lines, [stored]);
    const h = rows.find((r) => r.species === 'H35Cl')!;
    expect([h.reported, h.matched, h.outsideRange]).toEqual([18, 17, false]);
    const d = rows.find((r) => r.species === 'D35Cl')!;
    expect(d.outsideRange).toBe(true);
    expect(d.matched).toBe(0);
    expect(d.message).toMatch(
      /^D³⁵Cl fundamental \(1←0\): your 7 lines lie near 2091 cm⁻¹, outside the spectrum you uploaded \(2500–3200 cm⁻¹\)/,
    );
  });
});

describe('the third comparison: reported numbers against the student’s own spectrum', () => {
  const e = expectedBand('H35Cl', 1); // Huber & Herzberg via NIST WebBook

  it('agrees with a correct reading, and differs from a band centre misread by a line spacing', () => {
    const rows = compareWithAnalysis(
      [
        { key: 'bandCentre', species: 'H35Cl', valueText: e.origin.toFixed(2), unit: 'cm-1', uncertaintyText: '0.05' },
        {
          key: 'bandCentre',
          species: 'H37Cl',
          valueText: (expectedBand('H37Cl', 1).origin - 20.9).toFixed(2),
          unit: 'cm-1',
          uncertaintyText: '0.05',
        },
        { key: 'B0', species: 'H35Cl', valueText: e.B0.toFixed(4), unit: 'cm-1', uncertaintyText: null },
        { key: 'B0', species: 'H35Cl', valueText: (e.B0 * 1.06).toFixed(3), unit: 'cm-1', uncertaintyText: null },
        { key: 're', species: 'H35Cl', valueText: '127.46', unit: 'pm', uncertaintyText: null },
      ],
      [stored],
    );
    expect(rows.map((r) => [r.key, r.species, r.verdict])).toEqual([
      ['bandCentre', 'H35Cl', 'within'],
      ['bandCentre', 'H37Cl', 'outside'],
      ['B0', 'H35Cl', 'within'],
      ['B0', 'H35Cl', 'outside'],
      ['re', 'H35Cl', 'within'],
    ]);
  });

  it('accepts a B₀ from a fit without D when the spectrum was fitted with it (either model is defensible)', () => {
    const band = stored.ok ? stored.results.find((r) => r.isotopologue === 'H35Cl' && r.band === 'fundamental')!.fit! : null;
    expect(band!.model).toBe('cubic');
    expect(band!.alternative!.model).toBe('quadratic');
    const quadraticB0 = band!.alternative!.B0.value;
    // Far enough from the cubic model's B₀ to be "outside" against it alone.
    expect(Math.abs(quadraticB0 - band!.B0.value) / band!.B0.value).toBeGreaterThan(0.003);
    const [row] = compareWithAnalysis(
      [{ key: 'B0', species: 'H35Cl', valueText: quadraticB0.toFixed(4), unit: 'cm-1', uncertaintyText: null }],
      [stored],
    );
    expect(row.verdict).toBe('within');
  });

  it('uses the instructor’s accuracy band when there is one', () => {
    const [row] = compareWithAnalysis(
      [
        {
          key: 'bandCentre',
          species: 'H35Cl',
          valueText: (e.origin + 1.5).toFixed(2),
          unit: 'cm-1',
          uncertaintyText: null,
          accuracy: { absolute: 2, unit: 'cm-1' },
        },
      ],
      [stored],
    );
    expect(row.verdict).toBe('within');
    expect(row.basis).toBe("the practical's accuracy band");
  });
});
