/**
 * Literature values of every quantity for an isotopologue, in SI, with their provenance.
 *
 * Decisions a marker should know:
 * - bandCentre is the measured band origin where the table has one, otherwise G(1) − G(0).
 * - forceConstant is k from the band centre (harmonic approximation, what students compute
 *   from their spectrum); kₑ from ωₑ is the separate key forceConstantE.
 * - reducedMass from the isotopic masses; r₀ from B₀ = Bₑ − αₑ/2; B₁ = Bₑ − 3αₑ/2.
 * - zero-point and dissociation energies use the two-term G(v) of the Morse model (ωₑ, ωₑxₑ),
 *   the same formulas students use.
 * - isotopeShift / isotopeRatio compare with the partner isotopologue (by default ³⁵Cl↔³⁷Cl,
 *   ⁷⁹Br↔⁸¹Br, otherwise H↔D, otherwise ¹²C↔¹³C), from both band centres.
 */
import { c, h } from './constants';
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
    ['Cl', 35, 37], ['Cl', 37, 35], ['Br', 79, 81], ['Br', 81, 79], ['H', 1, 2], ['H', 2, 1], ['C', 12, 13], ['C', 13, 12],
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
  return { value: vibrationalTerm(entry.constants, 1) - vibrationalTerm(entry.constants, 0), source: `G(1) − G(0) from ωₑ, ωₑxₑ, ωₑyₑ: ${entry.provenance}` };
}

const cache = new Map<string, Partial<Record<QuantityKey, ReferenceValue>>>();

/** Literature value of each quantity available for the species (formula or parsed). */
export function referenceValues(speciesInput: Species | string, partnerInput?: Species | string): Partial<Record<QuantityKey, ReferenceValue>> {
  const species = typeof speciesInput === 'string' ? (() => { const p = parseSpecies(speciesInput); return p.ok ? p.species : undefined; })() : speciesInput;
  if (!species) return {};
  const partner = partnerInput === undefined ? defaultPartner(species) : typeof partnerInput === 'string' ? (() => { const p = parseSpecies(partnerInput); return p.ok ? p.species : undefined; })() : partnerInput;
  const cacheKey = `${species.formula}|${partner?.formula ?? ''}|${species.reducedMassU}`;
  const hit = cache.get(cacheKey);
  if (hit) return hit;
  const out: Partial<Record<QuantityKey, ReferenceValue>> = {};
  const put = (key: QuantityKey, valueSI: number, source: string) => {
    if (Number.isFinite(valueSI)) out[key] = { valueSI, unitSI: QUANTITIES[key].siUnit, display: show(valueSI, key), source };
  };
  const mu = species.reducedMassKg;
  const atomSources = species.atoms.every((a) => a.source === ISOTOPE_SOURCE) ? ISOTOPE_SOURCE : species.atoms.map((a) => a.source).join('; ');
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
    const De = (k.omegaE * k.omegaE) / (4 * k.omegaExe);
    put('zeroPointEnergy', zpe * hc, `G(0) = ωₑ/2 − ωₑxₑ/4 (${src})`);
    put('dissociationEnergy', De * hc, `Morse Dₑ = ωₑ²/(4ωₑxₑ) (${src})`);
    put('dissociationEnergy0', (De - zpe) * hc, `Morse D₀ = Dₑ − G(0) (${src})`);
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
