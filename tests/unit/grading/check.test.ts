import { describe, expect, it } from 'vitest';
import {
  checkSubmission,
  simulateLineList,
  assignPeaks,
  QUANTITY_KEYS,
  forceConstantFromBand,
  parseSpecies,
  type SubmissionInput,
} from '@/lib/grading';

// Band origin of H³⁵Cl 2885.98 cm⁻¹ (reference-diatomics.md, from memory).
const base = (): SubmissionInput => ({
  species: 'H35Cl',
  measured: { bandCentre: { value: '2885.98', unit: 'cm-1', uncertainty: 0.05 } },
  reported: { forceConstant: { value: '480.7', unit: 'N/m', uncertainty: 0.1 } },
  tolerances: { forceConstant: { relative: 0.01, partial: { relative: 0.03 } } },
});

describe('checkSubmission contract', () => {
  it('gives consistency and accuracy verdicts with the contract fields', () => {
    const r = checkSubmission(base());
    expect(r.problems).toEqual([]);
    expect(r.quantities.map((q) => q.basis)).toEqual(['consistency', 'accuracy']);
    for (const q of r.quantities) {
      for (const f of [
        'key',
        'basis',
        'reportedSI',
        'expectedSI',
        'unitSI',
        'deviation',
        'relativeDeviation',
        'verdict',
        'diagnoses',
        'notes',
        'reportedText',
        'reportedDisplay',
        'expectedDisplay',
      ])
        expect(q).toHaveProperty(f);
      expect(q.verdict).toBe('within');
      expect(q.unitSI).toBe('N m⁻¹');
      expect(q.reportedText).toBe('480.7 N/m');
    }
    expect(r.derived.reducedMassU).toBeCloseTo(0.979593, 6);
    expect(r.derived.forceConstant).toBeCloseTo(480.71, 2);
    expect(JSON.parse(JSON.stringify(r))).toEqual(r);
  });

  it('says consistent but inaccurate when the arithmetic is right for a poor measurement', () => {
    const input = base();
    input.measured = { bandCentre: { value: '2950.0', unit: 'cm-1' } };
    const mu = (parseSpecies('H35Cl') as { ok: true; species: { reducedMassKg: number } }).species.reducedMassKg;
    input.reported = { forceConstant: { value: forceConstantFromBand(295000, mu).toPrecision(4), unit: 'N/m' } };
    const r = checkSubmission(input);
    const [cons, acc] = r.quantities;
    expect(cons.verdict).toBe('within');
    expect(acc.verdict).toBe('outside');
    expect(acc.notes.map((n) => n.code)).toContain('consistent-not-accurate');
    expect(acc.diagnoses).toEqual([]);
  });

  it('notes missing uncertainty and spurious significant figures', () => {
    const input = base();
    input.reported = {
      forceConstant: { value: '480.70910', unit: 'N/m', uncertainty: 0.4 },
      bandCentre: { value: '2885.98', unit: 'cm-1' },
    };
    const r = checkSubmission(input);
    const k = r.quantities.find((q) => q.key === 'forceConstant')!;
    expect(k.notes.map((n) => n.code)).toContain('too-many-significant-figures');
    const b = r.quantities.find((q) => q.key === 'bandCentre')!;
    expect(b.notes.map((n) => n.code)).toContain('missing-uncertainty');
    const none = checkSubmission({ ...input, requireUncertainty: false });
    expect(none.quantities.find((q) => q.key === 'bandCentre')!.notes.map((n) => n.code)).not.toContain('missing-uncertainty');
  });

  it('uses the instructor reference over the literature value', () => {
    const input = base();
    input.reference = { forceConstant: { value: 470, unit: 'N/m' } };
    const acc = checkSubmission(input).quantities.find((q) => q.basis === 'accuracy')!;
    expect(acc.expectedSI).toBe(470);
    expect(acc.verdict).toBe('partial');
  });

  it('reports dimensionally wrong and unknown units as problems, and judges the number as outside', () => {
    const input = base();
    input.reported = { reducedMass: { value: '0.9796', unit: 'cm-1' } };
    const r = checkSubmission(input);
    expect(r.problems.map((p) => p.field)).toContain('reported.reducedMass.unit');
    expect(r.quantities[0].verdict).toBe('outside');
    expect(r.quantities[0].diagnoses.map((d) => d.code)).toEqual(['unit-mismatch']);
  });
});

describe('garbage in → problems, never exceptions', () => {
  const garbage: unknown[] = [
    null,
    undefined,
    42,
    'H35Cl',
    {},
    { species: 'Xx', reported: {}, tolerances: {} },
    { species: '', reported: { forceConstant: { value: '481', unit: 'N/m' } }, tolerances: {} },
    { species: 'H35Cl', reported: { forceConstant: { value: Number.NaN, unit: 'N/m' } }, tolerances: {} },
    { species: 'H35Cl', reported: { forceConstant: { value: Number.POSITIVE_INFINITY, unit: 'N/m' } }, tolerances: {} },
    { species: 'H35Cl', reported: { reducedMass: { value: -0.98, unit: 'u' } }, tolerances: {} },
    { species: { atoms: [{ symbol: 'H', massU: -1 }, { symbol: 'Cl' }] }, reported: {}, tolerances: {} },
    { species: 'H35Cl', reported: { forceConstant: { value: '', unit: '' } }, tolerances: {} },
    { species: 'H35Cl', reported: { nonsense: { value: 1, unit: 'u' } }, tolerances: {} },
    { species: 'H35Cl', measured: { bandCentre: { value: 'abc', unit: 'cm-1' } }, reported: {}, tolerances: {} },
    { species: 'H35Cl', measured: { bandCentre: { value: -5, unit: 'cm-1' } }, reported: {}, tolerances: {} },
    { species: 'H35Cl', measured: { lines: 'not a list' }, reported: {}, tolerances: {} },
    { species: 'H35Cl', measured: { lines: [{ branch: 'P', J: 0, wavenumber: 2886 }] }, reported: {}, tolerances: {} },
    {
      species: 'H35Cl',
      measured: { overtone: { value: 9000, unit: 'cm-1' }, bandCentre: { value: 2886, unit: 'cm-1' } },
      reported: {},
      tolerances: {},
    },
  ];
  it.each(garbage.map((g, i) => [i, g]))('case %i', (_i, g) => {
    const r = checkSubmission(g as SubmissionInput);
    expect(Array.isArray(r.problems)).toBe(true);
    expect(r.problems.length).toBeGreaterThan(0);
    expect(() => JSON.stringify(r)).not.toThrow();
  });

  it('a million lines come back as a problem quickly', () => {
    const lines = Array.from({ length: 1_000_000 }, (_, i) => ({ branch: 'R' as const, J: i, wavenumber: 2900 + i }));
    const t = performance.now();
    const r = checkSubmission({ species: 'H35Cl', measured: { lines }, reported: {}, tolerances: {} });
    expect(performance.now() - t).toBeLessThan(1000);
    expect(r.problems[0].field).toBe('measured.lines');
  });

  it('random valid submissions never throw and always give finite numbers (property test)', () => {
    let seed = 12345;
    const rnd = () => (seed = (seed * 16807) % 2147483647) / 2147483647;
    const species = ['H35Cl', 'D35Cl', 'H37Cl', 'H79Br', '12C16O', 'H19F', '14N2', '13C16O'];
    const units: Record<string, string[]> = {
      wavenumber: ['cm-1', 'm-1', '/cm', 'cm⁻¹'],
      mass: ['u', 'kg', 'g/mol', 'Da'],
      forceConstant: ['N/m', 'mdyn/Å', 'dyn/cm'],
      length: ['Å', 'pm', 'nm'],
      energy: ['cm-1', 'eV', 'kJ/mol'],
      ratio: [''],
    };
    const dims: Record<string, string> = {
      bandCentre: 'wavenumber',
      reducedMass: 'mass',
      forceConstant: 'forceConstant',
      forceConstantE: 'forceConstant',
      B0: 'wavenumber',
      B1: 'wavenumber',
      Be: 'wavenumber',
      alphaE: 'wavenumber',
      D: 'wavenumber',
      re: 'length',
      r0: 'length',
      omegaE: 'wavenumber',
      omegaExe: 'wavenumber',
      zeroPointEnergy: 'energy',
      dissociationEnergy: 'energy',
      dissociationEnergy0: 'energy',
      isotopeShift: 'wavenumber',
      isotopeRatio: 'ratio',
    };
    for (let t = 0; t < 200; t++) {
      const sp = species[Math.floor(rnd() * species.length)];
      const lines = simulateLineList(sp, { jMax: 3 + Math.floor(rnd() * 15) }).map((l) => ({
        branch: l.branch,
        J: l.J,
        wavenumber: l.wavenumber + (rnd() - 0.5) * 0.2,
      }));
      const reported: Record<string, { value: string; unit: string }> = {};
      for (const k of QUANTITY_KEYS) {
        if (rnd() < 0.5) continue;
        const us = units[dims[k]];
        reported[k] = {
          value: (rnd() * 10 ** (rnd() * 8 - 4)).toPrecision(1 + Math.floor(rnd() * 6)),
          unit: us[Math.floor(rnd() * us.length)],
        };
      }
      const r = checkSubmission({
        species: sp,
        measured: {
          lines: rnd() < 0.8 ? lines : undefined,
          bandCentre: rnd() < 0.5 ? { value: String(lines[0].wavenumber + 40), unit: 'cm-1' } : undefined,
        },
        reported,
        tolerances: { forceConstant: { relative: rnd() * 0.05 }, B0: { sigma: 2 }, re: { absolute: 0.002, unit: 'Å' } },
        centrifugal: rnd() < 0.5,
      });
      for (const q of r.quantities) {
        expect(
          Number.isFinite(q.reportedSI) &&
            Number.isFinite(q.expectedSI) &&
            Number.isFinite(q.deviation) &&
            Number.isFinite(q.relativeDeviation),
        ).toBe(true);
        expect(['within', 'partial', 'outside', 'not-checked']).toContain(q.verdict);
        if (q.verdict !== 'outside') expect(q.diagnoses).toEqual([]);
      }
    }
  }, 60_000);
});

describe('automatic assignment and simulation', () => {
  it('assigns an unlabelled H³⁵Cl peak list with H³⁷Cl doublets and a 1.5 cm⁻¹ calibration offset', () => {
    const sim = simulateLineList('H35Cl', { jMax: 10, isotopeChlorine: true, bandOrigin: 2885.98 + 1.5 });
    const shuffled = [...sim].sort(() => 0.5 - Math.random());
    const a = assignPeaks(
      shuffled.map((l) => l.wavenumber),
      'H35Cl',
    );
    expect(a.ok).toBe(true);
    const main = sim.filter((l) => l.species === 'H35Cl');
    expect(a.assignments).toHaveLength(main.length);
    for (const l of main) {
      const got = a.assignments.find((x) => Math.abs(x.wavenumber - l.wavenumber) < 1e-9)!;
      expect(`${got.branch}(${got.J})`).toBe(`${l.branch}(${l.J})`);
      expect(got.confidence).toBeGreaterThan(0.9);
    }
    expect(a.unassigned.every((x) => x.likelyIsotopologue === 'H37Cl')).toBe(true);
    expect(a.bandCentreEstimate!).toBeCloseTo(2887.48, 0);
  });

  it.each([
    ['12C16O', 30],
    ['D35Cl', 16],
    ['H79Br', 12],
    ['H19F', 8],
  ] as const)('assigns %s (J ≤ %i) with every 7th line missing', (sp, jMax) => {
    const sim = simulateLineList(sp, { jMax }).filter((_, i) => i % 7 !== 3);
    const a = assignPeaks(
      sim.map((l) => l.wavenumber),
      sp,
    );
    for (const l of sim) {
      const got = a.assignments.find((x) => Math.abs(x.wavenumber - l.wavenumber) < 1e-9);
      expect(got && `${got.branch}(${got.J})`).toBe(`${l.branch}(${l.J})`);
    }
  });

  it('assignPeaks rejects garbage without throwing', () => {
    expect(assignPeaks('x' as unknown, 'H35Cl').ok).toBe(false);
    expect(assignPeaks([1, Number.NaN, 3], 'H35Cl').ok).toBe(false);
    expect(assignPeaks([2900, 2920, 2940], 'Xx').ok).toBe(false);
  });

  it('simulated intensities follow the Boltzmann population (2J+1)exp(−hcBJ(J+1)/kT) at 298 K', () => {
    const sim = simulateLineList('H35Cl', { jMax: 10 });
    const strongest = sim.reduce((m, l) => (l.intensity > m.intensity ? l : m));
    // kT/hc ≈ 207 cm⁻¹ at 298 K; J_max ≈ √(kT/2hcB) − ½ ≈ 2.7 for B₀ = 10.44 cm⁻¹
    expect(strongest.J).toBe(3);
    expect(Math.max(...sim.map((l) => l.intensity))).toBe(1);
    const r = (J: number) => sim.find((l) => l.branch === 'R' && l.J === J)!.intensity;
    const B0 = 10.59341 - 0.30718 / 2;
    const expected = (5 / 3) * Math.exp((-1.438776877 * B0 * (6 - 2)) / 298); // c₂ = hc/k = 1.438776877 cm K (CODATA 2018)
    expect(r(2) / r(1)).toBeCloseTo(expected, 6);
  });
});
