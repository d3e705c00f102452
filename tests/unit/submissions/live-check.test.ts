import { describe, expect, it } from 'vitest';
import { liveCheck } from '@/lib/submissions/live-check';

// Unit spellings and dimensions as in lib/grading/units.ts (common practice: cm⁻¹ for wavenumbers, Å for lengths).
describe('liveCheck: what a student is told while typing', () => {
  it('says nothing for an empty quantity', () => {
    expect(liveCheck({ value: '', unit: 'cm-1', uncertainty: '' }, 'wavenumber', true)).toEqual([]);
  });

  it('accepts a wavenumber in cm-1 with its uncertainty', () => {
    expect(liveCheck({ value: '10.44', unit: 'cm-1', uncertainty: '0.02' }, 'wavenumber', true)).toEqual([]);
    expect(liveCheck({ value: '10.44', unit: 'cm⁻¹', uncertainty: '0.02' }, 'wavenumber', true)).toEqual([]);
  });

  it('names a length unit typed for a rotational constant (B₀ in "cm")', () => {
    const issues = liveCheck({ value: '10.44', unit: 'cm', uncertainty: '0.02' }, 'wavenumber', true);
    expect(issues).toHaveLength(1);
    expect(issues[0].field).toBe('unit');
    expect(issues[0].message).toMatch(/"cm" is a unit of length/);
    expect(issues[0].message).toMatch(/wavenumber/);
  });

  it('asks for a missing unit and for a required uncertainty', () => {
    const issues = liveCheck({ value: '481.3', unit: '', uncertainty: '' }, 'forceConstant', true);
    expect(issues.map((i) => i.field).sort()).toEqual(['uncertainty', 'unit']);
  });

  it('counts an uncertainty written into the value ("481 ± 3")', () => {
    expect(liveCheck({ value: '481 ± 3', unit: 'N/m', uncertainty: '' }, 'forceConstant', true)).toEqual([]);
  });

  it('refuses an ambiguous comma and a negative uncertainty', () => {
    expect(liveCheck({ value: '2,886', unit: 'cm-1', uncertainty: '' }, 'wavenumber', false)[0].message).toMatch(/ambiguous/);
    expect(liveCheck({ value: '2886', unit: 'cm-1', uncertainty: '-1' }, 'wavenumber', false)[0].field).toBe('uncertainty');
  });

  it('a pure number (isotope ratio) needs no unit', () => {
    expect(liveCheck({ value: '0.7246', unit: '', uncertainty: '' }, 'ratio', false)).toEqual([]);
  });
});
