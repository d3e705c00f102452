import { describe, expect, it } from 'vitest';
import {
  toSI,
  fromSI,
  formatUnit,
  parseQuantity,
  parseTypedNumber,
  precisionAgainstUncertainty,
  judge,
  marksFor,
  formatNumber,
  QUANTITIES,
  QUANTITY_KEYS,
  c,
  h,
  e,
  NA,
  u,
} from '@/lib/grading';

describe('units people type (conversion factors from CODATA 2018 constants)', () => {
  it.each([
    ['cm-1', 'wavenumber', 1, 100],
    ['cm^-1', 'wavenumber', 1, 100],
    ['cm⁻¹', 'wavenumber', 1, 100],
    ['/cm', 'wavenumber', 1, 100],
    ['m-1', 'wavenumber', 1, 1],
    ['Hz', 'wavenumber', c, 1],
    ['THz', 'wavenumber', 1, 1e12 / c],
    ['u', 'mass', 1, u],
    ['Da', 'mass', 1, u],
    ['amu', 'mass', 1, u],
    ['kg', 'mass', 1, 1],
    ['g', 'mass', 1, 1e-3],
    ['g/mol', 'mass', 1, 1e-3 / NA],
    ['N/m', 'forceConstant', 1, 1],
    ['N m-1', 'forceConstant', 1, 1],
    ['mdyn/Å', 'forceConstant', 1, 100],
    ['mdyn/A', 'forceConstant', 1, 100],
    ['dyn/cm', 'forceConstant', 1, 1e-3],
    ['Å', 'length', 1, 1e-10],
    ['A', 'length', 1, 1e-10],
    ['pm', 'length', 1, 1e-12],
    ['nm', 'length', 1, 1e-9],
    ['m', 'length', 1, 1],
    ['eV', 'energy', 1, e],
    ['kJ/mol', 'energy', 1, 1000 / NA],
    ['cm-1', 'energy', 1, 100 * h * c],
  ] as const)('%s as %s', (unit, dim, value, si) => {
    const r = toSI(value, unit, dim);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.valueSI / si).toBeCloseTo(1, 12);
  });

  it('µm for a wavenumber is a wavelength: 3.465 µm ↔ 2886 cm⁻¹', () => {
    const r = toSI(3.465, 'µm', 'wavenumber');
    expect(r.ok && r.valueSI / 100).toBeCloseTo(2886.0, 0);
    const back = fromSI(288600, 'µm', 'wavenumber');
    expect(back.ok && back.value).toBeCloseTo(3.465, 3);
  });

  it('rejects unknown and dimensionally wrong units with a message (a mass in cm⁻¹ is an error, not a zero)', () => {
    const wrong = toSI(0.98, 'cm-1', 'mass');
    expect(wrong.ok).toBe(false);
    if (!wrong.ok) expect(wrong.message).toMatch(/wavenumber/);
    const unknown = toSI(1, 'furlong', 'length');
    expect(unknown.ok).toBe(false);
    expect(toSI(1, '', 'mass').ok).toBe(false);
    expect(toSI(Number.NaN, 'u', 'mass').ok).toBe(false);
  });

  it('typesets units', () => {
    expect(formatUnit('cm-1')).toBe('cm⁻¹');
    expect(formatUnit('N/m')).toBe('N m⁻¹');
    expect(formatUnit('mdyn/A')).toBe('mdyn Å⁻¹');
    expect(formatUnit('kJ/mol')).toBe('kJ mol⁻¹');
    expect(formatUnit('W m-2')).toBe('W m⁻²');
  });

  it('every quantity has a display unit its dimension understands', () => {
    for (const k of QUANTITY_KEYS) {
      const q = QUANTITIES[k];
      expect(q.key).toBe(k);
      expect(toSI(1, q.displayUnit, q.dimension).ok, k).toBe(true);
    }
  });
});

describe('typed numbers and significant figures', () => {
  it.each([
    ['2885.98', 2885.98, 6, -2],
    ['481', 481, 3, 0],
    ['1.6266e-27', 1.6266e-27, 5, -31],
    ['1.6266 × 10⁻²⁷', 1.6266e-27, 5, -31],
    ['0.00530', 0.0053, 3, -5],
    ['−0.307', -0.307, 3, -3],
  ])('%s', (text, value, sf, last) => {
    const r = parseTypedNumber(text);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value).toBeCloseTo(value, 40);
    expect(r.sigFigs).toBe(sf);
    expect(r.lastDigitPower).toBe(last);
  });

  it('reads uncertainties written with the number', () => {
    const a = parseTypedNumber('2885.98(5)');
    expect(a.ok && a.uncertainty).toBeCloseTo(0.05, 12);
    const b = parseTypedNumber('(4.81 ± 0.03) × 10²');
    expect(b.ok && b.value).toBe(481);
    expect(b.ok && b.uncertainty).toBeCloseTo(3, 12);
  });

  it('flags spurious precision and coarse rounding against the uncertainty', () => {
    const t = (s: string) => {
      const r = parseTypedNumber(s);
      if (!r.ok) throw new Error(r.message);
      return r;
    };
    expect(precisionAgainstUncertainty(t('2885.9834'), 0.05)).toBe('too-many-significant-figures');
    expect(precisionAgainstUncertainty(t('2885.98'), 0.05)).toBe('ok');
    expect(precisionAgainstUncertainty(t('2886'), 0.05)).toBe('too-few-significant-figures');
  });

  it.each(['', 'abc', '1.2.3', '2,886', 'NaN', 'Infinity', '1e999'])('rejects %j', (text) => {
    expect(parseTypedNumber(text).ok).toBe(false);
  });

  it('parseQuantity returns SI and the uncertainty in SI', () => {
    const r = parseQuantity({ value: '2885.98', unit: 'cm-1', uncertainty: 0.05 }, 'wavenumber');
    expect(r.ok && r.valueSI).toBeCloseTo(288598, 6);
    expect(r.ok && r.uncertaintySI).toBeCloseTo(5, 9);
  });

  it('formats numbers sensibly', () => {
    expect(formatNumber(480.709099, 4)).toBe('480.7');
    expect(formatNumber(1.626652e-27, 4)).toBe('1.627 × 10⁻²⁷');
    expect(formatNumber(42747.3, 3)).toBe('42700');
    expect(formatNumber(-2.1, 3)).toBe('−2.10');
  });
});

describe('tolerance bands', () => {
  it('absolute band in a unit, relative band and partial credit', () => {
    // band centre ±1 cm⁻¹ full marks, ±2 cm⁻¹ partial
    const tol = { absolute: 1, unit: 'cm-1', partial: { absolute: 2 } };
    expect(judge(288650, 288598, tol, { dimension: 'wavenumber' }).verdict).toBe('within');
    expect(judge(288750, 288598, tol, { dimension: 'wavenumber' }).verdict).toBe('partial');
    expect(judge(288850, 288598, tol, { dimension: 'wavenumber' }).verdict).toBe('outside');
    const rel = judge(490, 481, { relative: 0.01, partial: { relative: 0.03 } });
    expect(rel.verdict).toBe('partial');
    expect(rel.deviation).toBeCloseTo(9, 12);
    expect(rel.relativeDeviation).toBeCloseTo(9 / 481, 12);
  });

  it('sigma bands use the combined standard uncertainty, and say not-checked without one', () => {
    expect(judge(10.5, 10.0, { sigma: 2 }, { uncertaintySI: 0.3 }).verdict).toBe('within');
    expect(judge(10.7, 10.0, { sigma: 2 }, { uncertaintySI: 0.3 }).verdict).toBe('outside');
    expect(judge(10.7, 10.0, { sigma: 2 }).verdict).toBe('not-checked');
    expect(judge(10.7, 10.0, {}).verdict).toBe('not-checked');
    expect(judge(Number.NaN, 10.0, { relative: 1 }).verdict).toBe('not-checked');
  });

  it('marks for verdicts', () => {
    expect(marksFor('within', 4)).toBe(4);
    expect(marksFor('partial', 4)).toBe(2);
    expect(marksFor('partial', 4, 0.25)).toBe(1);
    expect(marksFor('outside', 4)).toBe(0);
    expect(marksFor('not-checked', 4)).toBe(0);
  });
});
