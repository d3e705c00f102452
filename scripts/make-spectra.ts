/**
 * Writes the synthetic spectra used by the tests and the demo:
 *   npx tsx scripts/make-spectra.ts [outDir]      (default tests/fixtures/spectra)
 *
 * Line positions come from the published constants through lib/grading's
 * simulateLineList (textbook formulas), intensities from Boltzmann populations at 298 K
 * times natural isotopic abundance, a Lorentzian line shape and seeded noise. The
 * output is deterministic: running it twice gives the same bytes. Fictional demo data,
 * labelled as synthetic inside every file.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { ISOTOPE_SOURCE, parseSpecies, referenceEntry, simulateLineList, stableIsotopes, type SimulatedLine } from '@/lib/grading';
import { formatLineListCsv } from '@/lib/linelist';
import { synthesizeSpectrum, type SynthesizeOptions } from '@/lib/spectrum/synthesize';
import { toCsv, toJcampDx } from '@/lib/spectrum/jcamp-write';
import type { YKind } from '@/lib/spectrum/types';

const TEMPERATURE = 298;
/** Lines weaker than this share of the strongest are left out of the reported line lists. */
const REPORT_THRESHOLD = 0.02;

interface Recipe {
  name: string;
  title: string;
  /** Isotopologues in the cell, each weighted by its natural abundance. */
  species: string[];
  jMax: number;
  from: number;
  to: number;
  step: number;
  fwhm: number;
  noise: number;
  seed: number;
  yKind: YKind;
  baseline: number;
  baselineSlope: number;
}

export const RECIPES: Recipe[] = [
  {
    name: 'hcl-298k',
    title: 'HCl band, H35Cl + H37Cl, 298 K',
    species: ['H35Cl', 'H37Cl'],
    jMax: 12,
    from: 2550,
    to: 3150,
    step: 0.2,
    fwhm: 0.7,
    noise: 0.002,
    seed: 35,
    yKind: 'absorbance',
    baseline: 0.02,
    baselineSlope: 1e-5,
  },
  {
    name: 'dcl-298k',
    title: 'DCl band, D35Cl + D37Cl, 298 K',
    species: ['D35Cl', 'D37Cl'],
    jMax: 16,
    from: 1880,
    to: 2300,
    step: 0.2,
    fwhm: 0.7,
    noise: 0.002,
    seed: 2,
    yKind: 'absorbance',
    baseline: 0.015,
    baselineSlope: 2e-5,
  },
  {
    // The ⁷⁹Br/⁸¹Br doublet (≈ 0.3 cm⁻¹ near the band centre) is not resolved at this width.
    name: 'hbr-298k',
    title: 'HBr band, H79Br + H81Br, 298 K',
    species: ['H79Br', 'H81Br'],
    jMax: 12,
    from: 2300,
    to: 2800,
    step: 0.2,
    fwhm: 0.8,
    noise: 0.002,
    seed: 79,
    yKind: 'transmittance',
    baseline: 0.01,
    baselineSlope: 0,
  },
  {
    name: 'co-298k',
    title: 'CO band, 12C16O, 298 K',
    species: ['12C16O'],
    jMax: 32,
    from: 2000,
    to: 2300,
    step: 0.2,
    fwhm: 0.5,
    noise: 0.002,
    seed: 12,
    yKind: 'absorbance',
    baseline: 0.01,
    baselineSlope: 0,
  },
];

/**
 * Weight of an isotopologue in the cell: the natural abundances of its heavier atoms. The
 * hydrogen isotope is the sample's choice (HCl or a deuterated DCl sample), so it counts as 1.
 */
function abundance(formula: string): number {
  const parsed = parseSpecies(formula);
  if (!parsed.ok) throw new Error(`cannot read species ${formula}: ${parsed.message}`);
  return parsed.species.atoms.reduce((prod, atom) => {
    if (atom.symbol === 'H') return prod;
    const a = stableIsotopes(atom.symbol).find((i) => i.massNumber === atom.massNumber)?.abundance;
    if (a === undefined) throw new Error(`no natural abundance for ${atom.massNumber}${atom.symbol}`);
    return prod * a;
  }, 1);
}

function linesFor(recipe: Recipe): SimulatedLine[] {
  const all: SimulatedLine[] = [];
  for (const sp of recipe.species) {
    const lines = simulateLineList(sp, { jMax: recipe.jMax, withCentrifugal: true, temperature: TEMPERATURE });
    if (lines.length === 0) throw new Error(`simulateLineList gave no lines for ${sp}`);
    const w = abundance(sp);
    for (const l of lines) all.push({ ...l, intensity: l.intensity * w });
  }
  const max = all.reduce((m, l) => Math.max(m, l.intensity), 0);
  for (const l of all) l.intensity /= max;
  return all.sort((a, b) => a.wavenumber - b.wavenumber);
}

function main(): void {
  const outDir = path.resolve(process.argv[2] ?? 'tests/fixtures/spectra');
  mkdirSync(outDir, { recursive: true });
  const readme: string[] = [
    '# Synthetic spectra (generated; do not edit)',
    '',
    'Written by `npx tsx scripts/make-spectra.ts`. **Fictional demo and test data, not measurements.**',
    '',
    `Line positions: lib/grading simulateLineList (R(J) = ν̃₀ + F₁(J+1) − F₀(J), P(J) = ν̃₀ + F₁(J−1) − F₀(J), with centrifugal distortion) from the reference constants in lib/grading/reference.ts.`,
    `Intensities: Boltzmann population of the lower level at ${TEMPERATURE} K, (2J+1)·exp(−hcB₀J(J+1)/kT), times natural isotopic abundance (${ISOTOPE_SOURCE}).`,
    'Line shape: Lorentzian of the stated FWHM (instrument-limited), seeded Gaussian noise (mulberry32 + Box–Muller).',
    `Line lists (*.lines.csv): the exact computed positions, rounded to 0.001 cm⁻¹, of lines at least ${REPORT_THRESHOLD * 100} % of the strongest; one file per isotopologue.`,
    '',
    '| file | species | range / cm⁻¹ | step | FWHM | noise σ | y | constants |',
    '|---|---|---|---|---|---|---|---|',
  ];
  for (const r of RECIPES) {
    const lines = linesFor(r);
    const opts: SynthesizeOptions = {
      lines,
      from: r.from,
      to: r.to,
      step: r.step,
      fwhm: r.fwhm,
      shape: 'lorentzian',
      peakAbsorbance: 0.8,
      baseline: r.baseline,
      baselineSlope: r.baselineSlope,
      noise: r.noise,
      seed: r.seed,
      yKind: r.yKind,
      title: `SYNTHETIC ${r.title} - Oscillab demo, not measured`,
    };
    const spectrum = synthesizeSpectrum(opts);
    const provenance = r.species.map((s) => `${s}: ${referenceEntry(s)?.provenance ?? 'unknown'}`).join('; ');
    const notes = [
      'SYNTHETIC SPECTRUM - fictional demo/test data generated by Oscillab scripts/make-spectra.ts, not a measurement.',
      `Species ${r.species.map((sp) => `${sp} (weight ${abundance(sp).toFixed(4)})`).join(' + ')}, natural isotopic abundance; T = ${TEMPERATURE} K; Lorentzian FWHM ${r.fwhm} cm-1; noise sigma ${r.noise}; seed ${r.seed}.`,
      `Constants: ${provenance}.`,
    ];
    const jdx = toJcampDx(spectrum, {
      title: spectrum.title,
      origin: 'Oscillab synthetic spectrum generator',
      owner: 'Public domain (synthetic data)',
      notes,
    });
    const csv = toCsv(spectrum, { comments: notes, digits: 6 });
    writeFileSync(path.join(outDir, `${r.name}.jdx`), jdx);
    writeFileSync(path.join(outDir, `${r.name}.csv`), csv);
    for (const sp of r.species) {
      const strongest = lines.reduce((m, l) => Math.max(m, l.intensity), 0);
      const reported = lines
        .filter((l) => l.species === sp && l.intensity >= REPORT_THRESHOLD * strongest)
        .map((l) => ({ branch: l.branch, J: l.J, wavenumber: Math.round(l.wavenumber * 1000) / 1000 }));
      writeFileSync(path.join(outDir, `${r.name}.${sp}.lines.csv`), formatLineListCsv(reported));
    }
    readme.push(
      `| ${r.name}.jdx / .csv | ${r.species.join(' + ')} | ${r.from}–${r.to} | ${r.step} | ${r.fwhm} | ${r.noise} | ${r.yKind} | ${provenance} |`,
    );
    console.log(
      `${r.name}: ${spectrum.x.length} points, ${lines.length} lines, jdx ${(jdx.length / 1024).toFixed(0)} KB, csv ${(csv.length / 1024).toFixed(0)} KB`,
    );
  }
  writeFileSync(path.join(outDir, 'README.md'), `${readme.join('\n')}\n`);
}

main();
