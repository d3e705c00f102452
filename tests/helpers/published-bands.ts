/**
 * Check data for the grading tests, computed here from published constants with the published
 * formulas, never with the code under test (nothing is imported from lib/grading).
 *
 * Sources, named beside each value:
 * - physical constants: CODATA 2018 through mathjs (speedOfLight, planckConstant, atomicMass);
 * - isotopic masses and abundances: AME2020 / NIST Atomic Weights and Isotopic Compositions
 *   through the npm package chemical-elements;
 * - spectroscopic constants: K. P. Huber and G. Herzberg (1979) via the NIST Chemistry WebBook,
 *   as in shared/reference-diatomics.md — from memory of that compilation unless marked;
 *   isotopologues not in the table by the isotope relations (same potential), computed here.
 *
 * Formulas: F_v(J) = B_v J(J+1) − D J²(J+1)², B_v = Bₑ − αₑ(v + ½);
 * R(J) = ν̃₀ + F₁(J+1) − F₀(J), P(J) = ν̃₀ + F₁(J−1) − F₀(J);
 * G(v) = ωₑ(v+½) − ωₑxₑ(v+½)² + ωₑyₑ(v+½)³; r = √(h/(8π²cμB)); k = 4π²c²ν̃²μ.
 */
import * as math from 'mathjs';
import { elementsAndIsotopesObject } from 'chemical-elements';

/** CODATA 2018 via mathjs. */
export const C = math.speedOfLight.toNumber('m/s');
export const H = math.planckConstant.toNumber('J s');
export const U = math.atomicMass.toNumber('kg');
export const E = math.elementaryCharge.toNumber('C');

/** Isotopic mass in u (AME2020 via chemical-elements); symbol D means ²H. */
export function isotopicMass(symbol: string, massNumber: number): number {
  const el = (elementsAndIsotopesObject as Record<string, { isotopes: { nominal: number; mass: number; abundance?: number }[] }>)[
    symbol === 'D' ? 'H' : symbol
  ];
  const iso = el?.isotopes.find((i) => i.nominal === massNumber);
  if (!iso) throw new Error(`no isotope ${symbol}-${massNumber}`);
  return iso.mass;
}

/** Abundance-weighted mean atomic mass in u (NIST isotopic compositions via chemical-elements). */
export function meanAtomicMass(symbol: string): number {
  const el = (elementsAndIsotopesObject as Record<string, { isotopes: { mass: number; abundance?: number }[] }>)[symbol];
  let m = 0;
  let w = 0;
  for (const i of el.isotopes)
    if (i.abundance) {
      m += i.mass * i.abundance;
      w += i.abundance;
    }
  return m / w;
}

export const reducedMassU = (m1: number, m2: number) => (m1 * m2) / (m1 + m2);

export interface Constants {
  omegaE: number;
  omegaExe: number;
  omegaEye: number;
  Be: number;
  alphaE: number;
  De: number;
  /** Band origin of the fundamental where measured (shared table, from memory). */
  bandOrigin?: number;
  /** Atoms as [symbol, mass number]. */
  atoms: [[string, number], [string, number]];
}

/** Rows of shared/reference-diatomics.md (Huber & Herzberg via NIST WebBook; provenance as stated there). */
export const PUBLISHED: Record<string, Constants> = {
  // memory; NIST CCCBDB agrees
  H35Cl: {
    omegaE: 2990.946,
    omegaExe: 52.8186,
    omegaEye: 0.2243,
    Be: 10.59341,
    alphaE: 0.30718,
    De: 5.3194e-4,
    bandOrigin: 2885.98,
    atoms: [
      ['H', 1],
      ['Cl', 35],
    ],
  },
  // memory
  D35Cl: {
    omegaE: 2145.163,
    omegaExe: 27.1825,
    omegaEye: 0.08649,
    Be: 5.448794,
    alphaE: 0.113291,
    De: 1.395e-4,
    atoms: [
      ['D', 2],
      ['Cl', 35],
    ],
  },
  // memory
  H79Br: {
    omegaE: 2648.975,
    omegaExe: 45.2175,
    omegaEye: -0.0029,
    Be: 8.464884,
    alphaE: 0.23328,
    De: 3.4575e-4,
    bandOrigin: 2558.53,
    atoms: [
      ['H', 1],
      ['Br', 79],
    ],
  },
  // memory
  '12C16O': {
    omegaE: 2169.81358,
    omegaExe: 13.28831,
    omegaEye: 0.010511,
    Be: 1.93128087,
    alphaE: 0.01750441,
    De: 6.12147e-6,
    bandOrigin: 2143.27,
    atoms: [
      ['C', 12],
      ['O', 16],
    ],
  },
  // read from a stored NIST WebBook page
  '7LiH': {
    omegaE: 1405.65,
    omegaExe: 23.2,
    omegaEye: 0.163,
    Be: 7.5131,
    alphaE: 0.2132,
    De: 8.617e-4,
    atoms: [
      ['Li', 7],
      ['H', 1],
    ],
  },
};

export function speciesMassU(c: Constants): number {
  const [[s1, a1], [s2, a2]] = c.atoms;
  return reducedMassU(isotopicMass(s1, a1), isotopicMass(s2, a2));
}

/**
 * Constants of another isotopologue of the same molecule by the isotope relations (same
 * potential, ρ = √(μ/μᵢ)): ωₑ ∝ ρ, ωₑxₑ ∝ ρ², ωₑyₑ ∝ ρ³, Bₑ ∝ ρ², αₑ ∝ ρ³, Dₑ ∝ ρ⁴. Computed values.
 */
export function isotopologue(parent: Constants, atoms: Constants['atoms']): Constants {
  const target = { ...parent, atoms, bandOrigin: undefined };
  const rho = Math.sqrt(speciesMassU(parent) / speciesMassU(target));
  return {
    ...target,
    omegaE: parent.omegaE * rho,
    omegaExe: parent.omegaExe * rho ** 2,
    omegaEye: parent.omegaEye * rho ** 3,
    Be: parent.Be * rho ** 2,
    alphaE: parent.alphaE * rho ** 3,
    De: parent.De * rho ** 4,
  };
}

export const vibrationalTerm = (k: Constants, v: number) =>
  k.omegaE * (v + 0.5) - k.omegaExe * (v + 0.5) ** 2 + k.omegaEye * (v + 0.5) ** 3;

/** ν̃₀ of v = 1 ← 0: the measured band origin where the table has one, else G(1) − G(0). */
export const bandOrigin = (k: Constants) => k.bandOrigin ?? vibrationalTerm(k, 1) - vibrationalTerm(k, 0);

export const Bv = (k: Constants, v: number) => k.Be - k.alphaE * (v + 0.5);

/** Lines of the fundamental, P(pMax)…P(1), R(0)…R(rMax), in cm⁻¹, with the centrifugal term. */
export function fundamentalLines(
  k: Constants,
  pMax: number,
  rMax: number,
  withD = true,
): { branch: 'P' | 'R'; J: number; wavenumber: number }[] {
  const D = withD ? k.De : 0;
  const F = (v: number, J: number) => Bv(k, v) * J * (J + 1) - D * J * J * (J + 1) * (J + 1);
  const nu0 = bandOrigin(k);
  const out: { branch: 'P' | 'R'; J: number; wavenumber: number }[] = [];
  for (let J = pMax; J >= 1; J--) out.push({ branch: 'P', J, wavenumber: nu0 + F(1, J - 1) - F(0, J) });
  for (let J = 0; J <= rMax; J++) out.push({ branch: 'R', J, wavenumber: nu0 + F(1, J + 1) - F(0, J) });
  return out;
}

/** r = √(h/(8π²cμB)) in Å, B in cm⁻¹, μ in u (CODATA 2018 via mathjs). */
export function bondLengthAngstrom(B: number, muU: number): number {
  return Math.sqrt(H / (8 * Math.PI ** 2 * C * muU * U * B * 100)) * 1e10;
}

/** k = 4π²c²ν̃²μ in N m⁻¹, ν̃ in cm⁻¹, μ in u. */
export function forceConstant(nu: number, muU: number): number {
  return 4 * Math.PI ** 2 * C ** 2 * (nu * 100) ** 2 * muU * U;
}

/** Least-squares polynomial ν̃(m) of the given degree through the lines (normal equations in mathjs), cm⁻¹. */
export function studentFit(
  lines: { branch: 'P' | 'R'; J: number; wavenumber: number }[],
  degree: 2 | 3,
): { nu0: number; B0: number; B1: number; Be: number; alphaE: number; D?: number } {
  const m = lines.map((l) => (l.branch === 'R' ? l.J + 1 : -l.J));
  const X = m.map((x) => Array.from({ length: degree + 1 }, (_, k) => x ** k));
  const y = lines.map((l) => [l.wavenumber]);
  const Xt = math.transpose(X);
  const beta = (math.lusolve(math.multiply(Xt, X) as number[][], math.multiply(Xt, y) as number[][]) as number[][]).map((r) => r[0]);
  const [a, b, c, d] = beta;
  const B0 = (b - c) / 2;
  const B1 = (b + c) / 2;
  return { nu0: a, B0, B1, Be: (3 * B0 - B1) / 2, alphaE: B0 - B1, D: degree === 3 ? -d / 4 : undefined };
}

/** A number as a student types it: n significant figures. */
export const typed = (x: number, n = 6) => x.toPrecision(n);
