/**
 * What the student is told beside a verdict, in words that fit the quantity.
 *
 * - Presentation: a missing uncertainty, too many or too few significant figures for the
 *   uncertainty (common practice: the uncertainty to one or two significant figures, the value to
 *   the same decimal place), an uncertainty quoted to more figures than it can carry.
 * - Advice when one question passes and the other fails. A measured quantity that follows from
 *   the student's data but misses the accepted value points to the measurement; μ points to the
 *   masses; a model's prediction or estimate points to the model, since nobody measured it.
 * - Which method the number followed, when it is not the preferred one.
 */
import { formatNumber } from './format';
import type { Recomputed, RecomputeMethod } from './own-data';
import { ACCURACY_KIND, QUANTITIES, type QuantityKey } from './quantities';
import type { Verdict } from './tolerance';
import { fromSI } from './units';
import { precisionAgainstUncertainty, uncertaintyTooPrecise, type TypedNumber } from './uncertainty';

export interface Note {
  code: string;
  message: string;
}

export function presentationNotes(
  key: QuantityKey,
  typed: TypedNumber,
  valueSI: number,
  statedSI: number | undefined,
  unitOk: boolean,
  recomputed: Recomputed | undefined,
  uncertaintyRequired: boolean,
): Note[] {
  const notes: Note[] = [];
  if (statedSI === undefined && uncertaintyRequired) {
    notes.push({
      code: 'missing-uncertainty',
      message: `${QUANTITIES[key].label} is given without an uncertainty; a measured quantity needs one.`,
    });
  }
  if (!unitOk || valueSI === 0 || typed.value === 0) return notes;
  const typedPerSI = Math.abs(typed.value / valueSI);
  if (statedSI !== undefined && statedSI > 0) {
    const sigmaTyped = statedSI * typedPerSI;
    if (uncertaintyTooPrecise(Number(sigmaTyped.toPrecision(12)))) {
      notes.push({
        code: 'uncertainty-too-precise',
        message: `The uncertainty ±${formatNumber(sigmaTyped, 6)} is quoted to more figures than an uncertainty carries; give it to one or two significant figures.`,
      });
    }
  }
  // Judge the digits against the stated uncertainty, else against the one the data support.
  const sigmaSI = statedSI !== undefined && statedSI > 0 ? statedSI : recomputed && recomputed.sigmaSI > 0 ? recomputed.sigmaSI : undefined;
  if (sigmaSI === undefined) return notes;
  const sigmaTyped = sigmaSI * typedPerSI;
  const v = precisionAgainstUncertainty(typed, sigmaTyped);
  const basis = statedSI !== undefined && statedSI > 0 ? 'the stated uncertainty' : 'the uncertainty your data support';
  if (v === 'too-many-significant-figures')
    notes.push({
      code: 'too-many-significant-figures',
      message: `"${typed.text}" has more significant figures than ${basis} (±${formatNumber(sigmaTyped, 2)}) justifies; round the value to the uncertainty's decimal place.`,
    });
  if (v === 'too-few-significant-figures' && statedSI !== undefined)
    notes.push({
      code: 'too-few-significant-figures',
      message: `"${typed.text}" is rounded more coarsely than its uncertainty (±${formatNumber(sigmaTyped, 2)}); quote it to the uncertainty's decimal place.`,
    });
  return notes;
}

/** Advice when consistency and accuracy disagree, fitted to what the accuracy comparison tests. */
export function adviceNotes(key: QuantityKey, consistency: Verdict, accuracy: Verdict, followed: RecomputeMethod | undefined): Note[] {
  if (consistency === 'within' && accuracy === 'outside')
    return [{ code: 'consistent-not-accurate', message: consistentButNotAccurate(key, followed) }];
  if (consistency === 'outside' && (accuracy === 'within' || accuracy === 'partial'))
    return [{ code: 'accurate-not-consistent', message: accurateButNotConsistent(key) }];
  return [];
}

function consistentButNotAccurate(key: QuantityKey, followed: RecomputeMethod | undefined): string {
  const start = 'Your calculation is right for your own data, but the result is far from the accepted value';
  if (followed === 'harmonic-prediction')
    return `${start}: look at the model. The harmonic prediction √(μ/μ′) holds for the same force constant; check which isotopologue is which and that the masses are isotopic.`;
  switch (ACCURACY_KIND[key]) {
    case 'masses':
      return `${start}: look at the masses. Use the isotopic masses of the isotopes in this molecule (not average atomic masses) from a current table (AME2020).`;
    case 'model':
      return `${start}: look at the model. The Morse estimate from ωₑ and ωₑxₑ overshoots the measured dissociation energy, because the real levels close up faster near dissociation than the model assumes; say so when you compare.`;
    default:
      return `${start}: look at the measurement (calibration, line assignment, resolution).`;
  }
}

function accurateButNotConsistent(key: QuantityKey): string {
  if (key === 'dissociationEnergy' || key === 'dissociationEnergy0') {
    return 'The number is close to the accepted (measured) value but does not follow from your ωₑ and ωₑxₑ: if you quoted a published value, say where it comes from and give your own estimate as well.';
  }
  return 'The number is close to the accepted value but does not follow from your own data: check your working.';
}

const METHOD_WORDS: Partial<Record<RecomputeMethod, string>> = {
  'band-gap':
    'This band centre is the middle of the band gap, (R(0) + P(1))/2 = ν̃₀ + B₁ − B₀. It follows from your lines; a fit of all the lines gives ν̃₀ itself',
  'combination-differences': 'This follows from your lines through combination differences',
  'fit-without-centrifugal': 'This follows from a fit of your lines without the centrifugal term',
  'fit-with-centrifugal': 'This follows from a fit of your lines with the centrifugal term',
};

/** Which method the number followed, when it is not the preferred one. */
export function methodNote(key: QuantityKey, matched: Recomputed, preferred: Recomputed | undefined): Note | undefined {
  if (!preferred || matched === preferred || !matched.method) return undefined;
  const words = METHOD_WORDS[matched.method];
  if (!words) return undefined;
  const info = QUANTITIES[key];
  const shown = fromSI(preferred.valueSI, info.displayUnit, info.dimension);
  const value = shown.ok ? `${formatNumber(shown.value, 6)} ${shown.unit}`.trim() : `${formatNumber(preferred.valueSI, 6)} ${info.siUnit}`;
  return { code: 'followed-method', message: `${words}; ${preferred.source} gives ${value}.` };
}
