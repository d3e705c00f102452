import { describe, expect, it } from 'vitest';
import { checkSubmission } from '@/lib/grading';

// c = 2.99792458e10 cm/s (CODATA 2018, exact); u = 1.66053906660e-27 kg (CODATA 2018).
const C_CM = 2.99792458e10;
const U_KG = 1.6605390666e-27;
// H³⁵Cl band origin 2885.98 cm⁻¹ (Huber & Herzberg via NIST WebBook, from memory; ../shared/reference-diatomics.md).
const NU0 = 2885.98;

describe('slips are named for partial credit too', () => {
  it('k from integer mass numbers, inside the partial band, is named mass-numbers-used', () => {
    const muMassNumbers = ((1 * 35) / 36) * U_KG; // the slip: mass numbers 1 and 35
    const kSlipped = 4 * Math.PI ** 2 * C_CM ** 2 * NU0 ** 2 * muMassNumbers;
    const result = checkSubmission({
      species: 'H35Cl',
      measured: { bandCentre: { value: String(NU0), unit: 'cm-1' } },
      reported: { forceConstant: { value: kSlipped.toFixed(1), unit: 'N/m' } },
      tolerances: {},
      consistencyTolerances: { forceConstant: { relative: 0.003, partial: { relative: 0.02 } } },
    });
    const k = result.quantities.find((q) => q.key === 'forceConstant' && q.basis === 'consistency')!;
    expect(k.verdict).toBe('partial');
    expect(k.diagnoses.map((d) => d.code)).toEqual(['mass-numbers-used']);
  });
});
