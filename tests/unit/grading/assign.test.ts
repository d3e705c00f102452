/**
 * assignPeaks on plain peak lists, made here from Huber & Herzberg constants (NIST WebBook, from
 * memory; shared/reference-diatomics.md) through the published term formulas with the centrifugal
 * term, ³⁷Cl partners by the isotope relations with AME2020 masses — not by the code under test.
 */
import { describe, expect, it } from 'vitest';
import { assignPeaks } from '@/lib/grading';
import { PUBLISHED, fundamentalLines, isotopologue, type Constants } from '../../helpers/published-bands';

type Line = { branch: 'P' | 'R'; J: number; wavenumber: number };
const label = (l: { branch: string; J: number }) => `${l.branch}(${l.J})`;

function check(peaks: number[], truth: Map<number, string>, species: string) {
  const r = assignPeaks(peaks, species);
  const wrong = r.assignments.filter((a) => truth.get(a.wavenumber) !== label(a));
  return { r, wrong, right: r.assignments.length - wrong.length };
}

function lines(k: Constants, n: number, drop: string[] = [], offset = 0): Line[] {
  return fundamentalLines(k, n, n)
    .filter((l) => !drop.includes(label(l)))
    .map((l) => ({ ...l, wavenumber: l.wavenumber + offset }));
}

const H37Cl = isotopologue(PUBLISHED.H35Cl, [
  ['H', 1],
  ['Cl', 37],
]);

describe('assignPeaks on a clean peak list', () => {
  it.each([
    ['H35Cl', PUBLISHED.H35Cl, 10],
    ['D35Cl', PUBLISHED.D35Cl, 14],
    ['H79Br', PUBLISHED.H79Br, 10],
    ['12C16O', PUBLISHED['12C16O'], 28],
  ] as const)('%s: every line right with P(1), R(0) or both missing, and with a calibration offset of up to ±20 cm⁻¹', (species, k, n) => {
    for (const drop of [[], ['P(1)'], ['R(0)'], ['P(1)', 'R(0)']]) {
      for (const offset of [0, 17.5, -20]) {
        const own = lines(k, n, drop, offset);
        const truth = new Map(own.map((l) => [l.wavenumber, label(l)]));
        const { r, wrong, right } = check(
          own.map((l) => l.wavenumber),
          truth,
          species,
        );
        expect(r.ok, `${species} without ${drop.join(', ')} at ${offset}`).toBe(true);
        expect(wrong, `${species} without ${drop.join(', ')} at ${offset}`).toEqual([]);
        expect(right).toBe(own.length);
        // The offset is reported against the reference band origin, not corrected.
        expect(r.offset).toBeCloseTo(offset, 1);
      }
    }
  });

  it('H³⁵Cl with its H³⁷Cl partners (isotope relations, AME2020 masses): the ³⁷Cl lines are named, never taken, also with P(1) and R(0) gone and weak edge partners missing', () => {
    const main = lines(PUBLISHED.H35Cl, 10, ['P(1)', 'R(0)'], 6);
    const partner = lines(H37Cl, 10, [], 6).filter((l) => l.J < 8); // the weak ³⁷Cl lines at the edges not picked
    const truth = new Map(main.map((l) => [l.wavenumber, label(l)]));
    const { r, wrong, right } = check(
      [...main, ...partner].map((l) => l.wavenumber),
      truth,
      'H35Cl',
    );
    expect(wrong).toEqual([]);
    expect(right).toBe(main.length);
    expect(r.unassigned.filter((u) => u.likelyIsotopologue === 'H37Cl')).toHaveLength(partner.length);
  });

  it('an impurity line that fits no line of the band stays unassigned and does not move the others', () => {
    const own = lines(PUBLISHED.H35Cl, 8);
    const impurity = (own[3].wavenumber + own[4].wavenumber) / 2;
    const truth = new Map(own.map((l) => [l.wavenumber, label(l)]));
    const { r, wrong } = check([...own.map((l) => l.wavenumber), impurity], truth, 'H35Cl');
    expect(wrong).toEqual([]);
    expect(r.unassigned.map((u) => u.wavenumber)).toContain(impurity);
  });

  it('says why when no band is there, instead of failing silently', () => {
    const r = assignPeaks([1500, 1510, 1520, 1530], 'H35Cl');
    expect(r.ok).toBe(false);
    expect(r.problems[0].message).toMatch(/No H³⁵Cl band was found/);
  });
});
