/**
 * Line positions of diatomic rovibrational bands computed in the test itself, from published
 * constants through the published term formulas — never from the code under test:
 *
 *   G(v)   = ωₑ(v+½) − ωₑxₑ(v+½)² + ωₑyₑ(v+½)³
 *   B_v    = Bₑ − αₑ(v+½)
 *   F_v(J) = B_v J(J+1) − Dₑ J²(J+1)²
 *   R(J)   = G(v′) − G(0) + F_v′(J+1) − F₀(J),   P(J) = G(v′) − G(0) + F_v′(J−1) − F₀(J)
 *
 * Constants: K. P. Huber and G. Herzberg, Constants of Diatomic Molecules (1979), as
 * tabulated in the NIST Chemistry WebBook (NIST Standard Reference Database 69) — the rows
 * of /work/shared/reference-diatomics.md, which states they are quoted from memory of that
 * compilation (H³⁵Cl agreeing with NIST CCCBDB). The ³⁷Cl isotopologues are computed from
 * the ³⁵Cl rows by the isotope relations (ωₑ ∝ ρ, ωₑxₑ ∝ ρ², ωₑyₑ ∝ ρ³, Bₑ ∝ ρ², αₑ ∝ ρ³,
 * Dₑ ∝ ρ⁴ with ρ = √(μ/μᵢ)), as that table says to.
 * Masses and abundances: AME2020 / IUPAC, read straight from the npm package chemical-elements.
 * Intensities: Hönl–London factor (S_R = J+1, S_P = J) × Boltzmann factor at 298 K, with
 * hc/k = 1.438776877 cm K (CODATA 2018), × the natural abundance of the chlorine isotope.
 */
import { elementsAndIsotopesObject } from 'chemical-elements';
import { synthesizeSpectrum, type InstrumentOptions, type SynthesisLine } from '@/lib/spectrum/synthesize';
import type { Spectrum, YKind } from '@/lib/spectrum/types';

export const HH_SOURCE = 'Huber & Herzberg (1979) via NIST Chemistry WebBook, from memory (shared reference-diatomics.md)';

export interface Constants {
  omegaE: number;
  omegaExe: number;
  omegaEye: number;
  Be: number;
  alphaE: number;
  De: number;
}

/** Rows of the shared table (Huber & Herzberg via NIST WebBook, from memory). */
export const HH: Record<'H35Cl' | 'D35Cl' | 'H79Br' | '12C16O', Constants> = {
  H35Cl: { omegaE: 2990.946, omegaExe: 52.8186, omegaEye: 0.2243, Be: 10.59341, alphaE: 0.30718, De: 5.3194e-4 },
  D35Cl: { omegaE: 2145.163, omegaExe: 27.1825, omegaEye: 0.08649, Be: 5.448794, alphaE: 0.113291, De: 1.395e-4 },
  H79Br: { omegaE: 2648.975, omegaExe: 45.2175, omegaEye: -0.0029, Be: 8.464884, alphaE: 0.23328, De: 3.4575e-4 },
  '12C16O': { omegaE: 2169.81358, omegaExe: 13.28831, omegaEye: 0.010511, Be: 1.93128087, alphaE: 0.01750441, De: 6.12147e-6 },
};

type Iso = { mass: number; abundance: number };
function iso(symbol: string, massNumber: number): Iso {
  const el = (elementsAndIsotopesObject as Record<string, { isotopes: { nominal: number; mass: number; abundance?: number }[] }>)[symbol];
  const i = el.isotopes.find((x) => x.nominal === massNumber)!;
  return { mass: i.mass, abundance: i.abundance ?? 0 };
}

export const MASS = {
  H: iso('H', 1).mass,
  D: iso('H', 2).mass,
  Cl35: iso('Cl', 35).mass,
  Cl37: iso('Cl', 37).mass,
  Br79: iso('Br', 79).mass,
  Br81: iso('Br', 81).mass,
  C12: iso('C', 12).mass,
  C13: iso('C', 13).mass,
  O16: iso('O', 16).mass,
};
export const ABUNDANCE = {
  Cl35: iso('Cl', 35).abundance,
  Cl37: iso('Cl', 37).abundance,
  Br79: iso('Br', 79).abundance,
  Br81: iso('Br', 81).abundance,
  C12: iso('C', 12).abundance,
  C13: iso('C', 13).abundance,
};

const mu = (a: number, b: number) => (a * b) / (a + b);

export type Isotopologue = 'H35Cl' | 'H37Cl' | 'D35Cl' | 'D37Cl' | 'H79Br' | 'H81Br' | '12C16O' | '13C16O';

export const REDUCED_MASS: Record<Isotopologue, number> = {
  H35Cl: mu(MASS.H, MASS.Cl35),
  H37Cl: mu(MASS.H, MASS.Cl37),
  D35Cl: mu(MASS.D, MASS.Cl35),
  D37Cl: mu(MASS.D, MASS.Cl37),
  H79Br: mu(MASS.H, MASS.Br79),
  H81Br: mu(MASS.H, MASS.Br81),
  '12C16O': mu(MASS.C12, MASS.O16),
  '13C16O': mu(MASS.C13, MASS.O16),
};

const PARENT: Record<Isotopologue, keyof typeof HH> = {
  H35Cl: 'H35Cl',
  H37Cl: 'H35Cl',
  D35Cl: 'D35Cl',
  D37Cl: 'D35Cl',
  H79Br: 'H79Br',
  H81Br: 'H79Br',
  '12C16O': '12C16O',
  '13C16O': '12C16O',
};

export const NATURAL_WEIGHT: Record<Isotopologue, number> = {
  H35Cl: ABUNDANCE.Cl35,
  H37Cl: ABUNDANCE.Cl37,
  D35Cl: ABUNDANCE.Cl35,
  D37Cl: ABUNDANCE.Cl37,
  H79Br: ABUNDANCE.Br79,
  H81Br: ABUNDANCE.Br81,
  '12C16O': ABUNDANCE.C12,
  '13C16O': ABUNDANCE.C13,
};

/** The isotopologue's constants: the table row, or computed from it by the isotope relations. */
export function constantsOf(x: Isotopologue): Constants {
  const parent = PARENT[x];
  const k = HH[parent];
  if (parent === x) return k;
  const rho = Math.sqrt(REDUCED_MASS[parent] / REDUCED_MASS[x]);
  return {
    omegaE: k.omegaE * rho,
    omegaExe: k.omegaExe * rho ** 2,
    omegaEye: k.omegaEye * rho ** 3,
    Be: k.Be * rho ** 2,
    alphaE: k.alphaE * rho ** 3,
    De: k.De * rho ** 4,
  };
}

export const G = (k: Constants, v: number) => {
  const x = v + 0.5;
  return k.omegaE * x - k.omegaExe * x * x + k.omegaEye * x * x * x;
};
export const Bv = (k: Constants, v: number) => k.Be - k.alphaE * (v + 0.5);
export const F = (k: Constants, v: number, J: number) => Bv(k, v) * J * (J + 1) - k.De * J * J * (J + 1) * (J + 1);

export interface ExpectedBand {
  origin: number;
  B0: number;
  Bupper: number;
  Be: number;
  alphaE: number;
  D: number;
}

/** What a fit of the v′ ← 0 band should give (origin without any calibration offset). */
export function expectedBand(x: Isotopologue, vUpper: 1 | 2): ExpectedBand {
  const k = constantsOf(x);
  return { origin: G(k, vUpper) - G(k, 0), B0: Bv(k, 0), Bupper: Bv(k, vUpper), Be: k.Be, alphaE: k.alphaE, D: k.De };
}

export interface Line {
  species: Isotopologue;
  vUpper: 1 | 2;
  branch: 'P' | 'R';
  J: number;
  wavenumber: number;
  intensity: number;
}

const HC_OVER_K = 1.438776877; // cm K, CODATA 2018 second radiation constant / 1 (c₂ = hc/k)

export function bandLines(x: Isotopologue, vUpper: 1 | 2, opts: { jMax?: number; temperature?: number; strength?: number } = {}): Line[] {
  const k = constantsOf(x);
  const jMax = opts.jMax ?? 25;
  const T = opts.temperature ?? 298;
  const nu0 = G(k, vUpper) - G(k, 0);
  const weight = NATURAL_WEIGHT[x] * (opts.strength ?? 1);
  const boltz = (J: number) => Math.exp((-HC_OVER_K * F(k, 0, J)) / T);
  const out: Line[] = [];
  for (let J = 0; J <= jMax; J++) {
    out.push({
      species: x,
      vUpper,
      branch: 'R',
      J,
      wavenumber: nu0 + F(k, vUpper, J + 1) - F(k, 0, J),
      intensity: weight * (J + 1) * boltz(J),
    });
    if (J >= 1)
      out.push({
        species: x,
        vUpper,
        branch: 'P',
        J,
        wavenumber: nu0 + F(k, vUpper, J - 1) - F(k, 0, J),
        intensity: weight * J * boltz(J),
      });
  }
  return out;
}

export interface RecordOptions {
  lines: Line[];
  from: number;
  to: number;
  step: number;
  resolution: number;
  apodization?: InstrumentOptions['apodization'];
  lineWidth?: number;
  /** Added to every line position: a calibration error of the instrument. */
  offset?: number;
  /** Extra lines that belong to no band (an impurity), at the given positions (before the offset). */
  extra?: SynthesisLine[];
  noise: number;
  seed: number;
  peakAbsorbance?: number;
  baseline?: number;
  baselineSlope?: number;
  yKind?: YKind;
}

/** A spectrum recorded through the project's own generator (interferometer line shape, noise, baseline). */
export function record(o: RecordOptions): Spectrum {
  const shift = o.offset ?? 0;
  const lines: SynthesisLine[] = o.lines.map((l) => ({ wavenumber: l.wavenumber + shift, intensity: l.intensity }));
  for (const e of o.extra ?? []) lines.push({ wavenumber: e.wavenumber + shift, intensity: e.intensity });
  return synthesizeSpectrum({
    lines,
    from: o.from,
    to: o.to,
    step: o.step,
    instrument: { resolution: o.resolution, apodization: o.apodization, lineWidth: o.lineWidth },
    peakAbsorbance: o.peakAbsorbance ?? 0.8,
    baseline: o.baseline ?? 0.03,
    baselineSlope: o.baselineSlope ?? 0,
    noise: o.noise,
    seed: o.seed,
    yKind: o.yKind ?? 'absorbance',
    title: 'SYNTHETIC test spectrum',
  });
}
