/**
 * Literature values of every quantity for an isotopologue, in SI, with their provenance.
 *
 * Decisions a marker should know:
 * - bandCentre is the measured band origin where the table has one, otherwise G(1) − G(0).
 * - forceConstant is k from the band centre (harmonic approximation, what students compute
 *   from their spectrum); kₑ from ωₑ is the separate key forceConstantE.
 * - reducedMass from the isotopic masses; r₀ from B₀ = Bₑ − αₑ/2; B₁ = Bₑ − 3αₑ/2.
 * - the zero-point energy uses the two-term G(v) (ωₑ, ωₑxₑ), as students do; the dissociation
 *   energies are the measured ones (D₀ tabulated, Dₑ = D₀ + G(0)), not the Morse model's
 *   estimates, which overshoot them (morseEstimates gives those, to show beside).
 * - harmonicIsotopeReference: the harmonic expectation for an isotope shift or ratio, for a
 *   student's harmonic prediction (the observed ratio includes anharmonicity).
 * - isotopeShift / isotopeRatio compare with the partner isotopologue (by default ³⁵Cl↔³⁷Cl,
 *   ⁷⁹Br↔⁸¹Br, otherwise H↔D, otherwise ¹²C↔¹³C), from both band centres.
 */
import { c, e, h } from './constants';
import { formatNumber, withUnit } from './format';
import { bondLengthFromB, forceConstantFromBand } from './harmonic';
import { isotope, ISOTOPE_SOURCE } from './isotopes';
import { QUANTITIES, type QuantityKey } from './quantities';
import { referenceEntry, vibrationalTerm } from './reference';
import { parseSpecies, speciesFromAtoms, type Species } from './species';
import { fromSI } from './units';

export interface ReferenceValue {
  valueSI: number;
  unitSI: string;
  /** In the quantity's display unit, e.g. "2885.98 cm⁻¹". */
  display: string;
  source: string;
}

/** The isotopologue usually measured alongside: H³⁵Cl ↔ H³⁷Cl, H⁷⁹Br ↔ H⁸¹Br, else H ↔ D, else ¹²C ↔ ¹³C. */
const partnerCache = new Map<string, Species | null>();

export function defaultPartner(species: Species): Species | undefined {
  const key = `${species.formula}|${species.reducedMassU}`;
  const hit = partnerCache.get(key);
  if (hit !== undefined) return hit ?? undefined;
  const out = defaultPartnerUncached(species);
  if (partnerCache.size < 500) partnerCache.set(key, out ?? null);
  return out;
}

function defaultPartnerUncached(species: Species): Species | undefined {
  const swaps: [string, number, number][] = [
    ['Cl', 35, 37],
    ['Cl', 37, 35],
    ['Br', 79, 81],
    ['Br', 81, 79],
    ['H', 1, 2],
    ['H', 2, 1],
    ['C', 12, 13],
    ['C', 13, 12],
  ];
  for (const [sym, from, to] of swaps) {
    const idx = species.atoms.findIndex((a) => a.symbol === sym && a.massNumber === from);
    if (idx < 0) continue;
    const iso = isotope(sym, to);
    if (!iso) continue;
    const atoms: [Species['atoms'][0], Species['atoms'][1]] = [species.atoms[0], species.atoms[1]];
    atoms[idx] = { symbol: sym, massNumber: to, massU: iso.massU, source: iso.source };
    const partner = speciesFromAtoms(atoms[0], atoms[1]);
    if (referenceEntry(partner)) return partner;
  }
  return undefined;
}

function show(valueSI: number, key: QuantityKey): string {
  const info = QUANTITIES[key];
  const r = fromSI(valueSI, info.displayUnit, info.dimension);
  return r.ok ? withUnit(formatNumber(r.value, 6), r.unit) : withUnit(formatNumber(valueSI, 6), info.siUnit);
}

function bandCentreOf(species: Species): { value: number; source: string } | undefined {
  const entry = referenceEntry(species);
  if (!entry) return undefined;
  if (entry.bandOrigin) return { value: entry.bandOrigin.value, source: entry.bandOrigin.provenance };
  return {
    value: vibrationalTerm(entry.constants, 1) - vibrationalTerm(entry.constants, 0),
    source: `G(1) − G(0) from ωₑ, ωₑxₑ, ωₑyₑ: ${entry.provenance}`,
  };
}

const cache = new Map<string, Partial<Record<QuantityKey, ReferenceValue>>>();

/** Literature value of each quantity available for the species (formula or parsed). */
export function referenceValues(
  speciesInput: Species | string,
  partnerInput?: Species | string,
): Partial<Record<QuantityKey, ReferenceValue>> {
  const species =
    typeof speciesInput === 'string'
      ? (() => {
          const p = parseSpecies(speciesInput);
          return p.ok ? p.species : undefined;
        })()
      : speciesInput;
  if (!species) return {};
  const partner =
    partnerInput === undefined
      ? defaultPartner(species)
      : typeof partnerInput === 'string'
        ? (() => {
            const p = parseSpecies(partnerInput);
            return p.ok ? p.species : undefined;
          })()
        : partnerInput;
  const cacheKey = `${species.formula}|${partner?.formula ?? ''}|${species.reducedMassU}`;
  const hit = cache.get(cacheKey);
  if (hit) return hit;
  const out: Partial<Record<QuantityKey, ReferenceValue>> = {};
  const put = (key: QuantityKey, valueSI: number, source: string) => {
    if (Number.isFinite(valueSI)) out[key] = { valueSI, unitSI: QUANTITIES[key].siUnit, display: show(valueSI, key), source };
  };
  const mu = species.reducedMassKg;
  const atomSources = species.atoms.every((a) => a.source === ISOTOPE_SOURCE)
    ? ISOTOPE_SOURCE
    : species.atoms.map((a) => a.source).join('; ');
  put('reducedMass', mu, `μ from isotopic masses: ${atomSources}`);
  const entry = referenceEntry(species);
  if (entry) {
    const k = entry.constants;
    const src = entry.provenance;
    const band = bandCentreOf(species)!;
    const B0 = k.Be - k.alphaE / 2;
    const B1 = k.Be - (3 * k.alphaE) / 2;
    put('bandCentre', band.value * 100, band.source);
    put('forceConstant', forceConstantFromBand(band.value * 100, mu), `k = 4π²c²ν̃₀²μ (harmonic, from the band centre: ${band.source})`);
    put('forceConstantE', forceConstantFromBand(k.omegaE * 100, mu), `kₑ = 4π²c²ωₑ²μ (${src})`);
    put('Be', k.Be * 100, src);
    put('alphaE', k.alphaE * 100, src);
    put('B0', B0 * 100, `B₀ = Bₑ − αₑ/2 (${src})`);
    put('B1', B1 * 100, `B₁ = Bₑ − 3αₑ/2 (${src})`);
    if (k.De !== undefined) put('D', k.De * 100, src);
    put('re', k.reAngstrom * 1e-10, src);
    put('r0', bondLengthFromB(B0 * 100, mu), `r₀ = √(h/(8π²cμB₀)) with B₀ = Bₑ − αₑ/2 (${src})`);
    put('omegaE', k.omegaE * 100, src);
    put('omegaExe', k.omegaExe * 100, src);
    const hc = h * c * 100; // J per cm⁻¹
    const zpe = k.omegaE / 2 - k.omegaExe / 4;
    put('zeroPointEnergy', zpe * hc, `G(0) = ωₑ/2 − ωₑxₑ/4 (${src})`);
    // Like for like: the accepted dissociation energies are the measured ones. The Morse values
    // from the same constants are the model's estimates (morseEstimates), shown beside them.
    const measuredD0 = entry.dissociationEnergy0;
    if (measuredD0) {
      put('dissociationEnergy0', measuredD0.valueEV * e, measuredD0.provenance);
      put(
        'dissociationEnergy',
        measuredD0.valueEV * e + zpe * hc,
        `Dₑ = D₀ + G(0): D₀ ${measuredD0.provenance}; G(0) = ωₑ/2 − ωₑxₑ/4 (${src})`,
      );
    } else {
      const morse = morseEstimates(species)!;
      put('dissociationEnergy', morse.De.valueSI, `${morse.De.source}; no measured value is tabulated`);
      put('dissociationEnergy0', morse.D0.valueSI, `${morse.D0.source}; no measured value is tabulated`);
    }
    if (partner) {
      const pb = bandCentreOf(partner);
      if (pb) {
        const how = `band centres of ${species.display} (${band.source}) and ${partner.display} (${pb.source})`;
        put('isotopeShift', (pb.value - band.value) * 100, how);
        put('isotopeRatio', pb.value / band.value, how);
      }
    }
  }
  if (cache.size < 500) cache.set(cacheKey, out);
  return out;
}

/**
 * The Morse model's dissociation energies from the accepted ωₑ and ωₑxₑ: Dₑ = ωₑ²/(4ωₑxₑ),
 * D₀ = Dₑ − G(0). The linear (Birge–Sponer) extrapolation behind them overestimates, because
 * the real level spacings close up faster near the dissociation limit than a straight line.
 */
export function morseEstimates(species: Species): { De: ReferenceValue; D0: ReferenceValue } | undefined {
  const entry = referenceEntry(species);
  if (!entry) return undefined;
  const k = entry.constants;
  const hc = h * c * 100;
  const zpe = k.omegaE / 2 - k.omegaExe / 4;
  const De = (k.omegaE * k.omegaE) / (4 * k.omegaExe);
  const value = (key: QuantityKey, v: number, source: string): ReferenceValue => ({
    valueSI: v,
    unitSI: QUANTITIES[key].siUnit,
    display: show(v, key),
    source,
  });
  return {
    De: value('dissociationEnergy', De * hc, `Morse estimate Dₑ = ωₑ²/(4ωₑxₑ) from ${entry.provenance}`),
    D0: value('dissociationEnergy0', (De - zpe) * hc, `Morse estimate D₀ = Dₑ − G(0) from ${entry.provenance}`),
  };
}

/**
 * What the harmonic model predicts for the partner isotopologue: ν̃₀′/ν̃₀ = √(μ/μ′) exactly, and the
 * shift ν̃₀(√(μ/μ′) − 1) from the accepted band centre. A student's harmonic prediction is judged
 * against these; the observed ratio (from both measured band centres) differs by the anharmonicity.
 */
export function harmonicIsotopeReference(
  species: Species,
  partner: Species,
): { isotopeRatio: ReferenceValue; isotopeShift?: ReferenceValue } {
  const ratio = Math.sqrt(species.reducedMassKg / partner.reducedMassKg);
  const out: { isotopeRatio: ReferenceValue; isotopeShift?: ReferenceValue } = {
    isotopeRatio: {
      valueSI: ratio,
      unitSI: QUANTITIES.isotopeRatio.siUnit,
      display: show(ratio, 'isotopeRatio'),
      source: `harmonic expectation √(μ/μ′) for ${partner.display} from the isotopic masses (${ISOTOPE_SOURCE})`,
    },
  };
  const band = bandCentreOf(species);
  if (band) {
    const shift = band.value * 100 * (ratio - 1);
    out.isotopeShift = {
      valueSI: shift,
      unitSI: QUANTITIES.isotopeShift.siUnit,
      display: show(shift, 'isotopeShift'),
      source: `harmonic expectation ν̃₀(√(μ/μ′) − 1) for ${partner.display} from the accepted band centre of ${species.display} (${band.source})`,
    };
  }
  return out;
}
