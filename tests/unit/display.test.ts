import { describe, expect, it } from 'vitest';
import { cohortName, expectedToPrecision, isotopologueText, joinUnit, percentText, publishedSource } from '@/lib/display';
import { ISOTOPE_SOURCE, referenceValues } from '@/lib/grading';

const NBSP = '\u00a0';

describe('percentText: percentages as people write them (common practice: Unicode minus, no e-notation)', () => {
  it('keeps two significant figures below 1 % and never writes e-notation', () => {
    expect(percentText(-2.6e-3)).toBe(`−0.0026${NBSP}%`);
    expect(percentText(0.012, { signed: true })).toBe(`+0.012${NBSP}%`);
    expect(percentText(1.5)).toBe(`1.50${NBSP}%`);
    for (const v of [1e-5, 3.3e-4, 12188, 1e6, -97.47]) expect(percentText(v)).not.toMatch(/e[-+]?\d/);
  });
  it('groups thousands and says 0 for nothing, without a sign', () => {
    expect(percentText(12188)).toBe(`12\u2009188${NBSP}%`);
    expect(percentText(-4e-7)).toBe(`0${NBSP}%`);
    expect(percentText(0, { signed: true })).toBe(`0${NBSP}%`);
    expect(percentText(null)).toBe('—');
  });
});

describe('expectedToPrecision: one digit finer than the student typed', () => {
  // 0.299929 cm⁻¹ against a typed "0.300" (αₑ-sized number; the figure is invented for the check).
  it('rounds a long expected value to the typed precision plus one digit', () => {
    expect(expectedToPrecision(29.9929, 'alphaE', '0.300')).toBe(`0.2999${NBSP}cm⁻¹`); // 29.9929 m⁻¹ = 0.299929 cm⁻¹
    expect(expectedToPrecision(288607.3, 'bandCentre', '2886.1')).toBe(`2886.07${NBSP}cm⁻¹`);
  });
  it('never fewer than three or more than six significant figures', () => {
    expect(expectedToPrecision(288607.3, 'bandCentre', '2900')).toBe(`2890${NBSP}cm⁻¹`);
    expect(expectedToPrecision(288607.31234, 'bandCentre', '2886.0731234')).toBe(`2886.07${NBSP}cm⁻¹`);
  });
  it('without a typed value, five significant figures', () => {
    expect(expectedToPrecision(288607.3, 'bandCentre')).toBe(`2886.1${NBSP}cm⁻¹`);
  });
});

describe('publishedSource: the publication, not the provenance notes', () => {
  it('turns the engine’s own source strings into published references', () => {
    const values = referenceValues('H35Cl');
    const texts = Object.values(values).map((v) => publishedSource(v!.source));
    expect(texts.length).toBeGreaterThan(3);
    for (const t of texts) {
      expect(t).not.toMatch(/from memory|via npm|chemical-elements|stored copy|public reproduction/);
      expect(t.trim()).not.toBe('');
    }
    expect(publishedSource(ISOTOPE_SOURCE)).toMatch(/AME2020 atomic mass evaluation \(Wang et al\., Chin\. Phys\. C 45, 030003, 2021\)/);
    expect(texts.some((t) => /Huber & Herzberg, Constants of Diatomic Molecules \(1979\)/.test(t))).toBe(true);
  });
});

describe('small typesetting helpers', () => {
  it('isotopologues, cohorts and units', () => {
    expect(isotopologueText('H35Cl')).toBe('H³⁵Cl');
    expect(isotopologueText('12C16O')).toBe('¹²C¹⁶O');
    expect(isotopologueText('35Cl2')).toBe('³⁵Cl₂');
    expect(cohortName({ name: 'Group A', term: '2026 Autumn' })).toBe('Group A (2026 Autumn)');
    expect(joinUnit('481.0', 'N m⁻¹')).toBe(`481.0${NBSP}N m⁻¹`);
  });
});
