import { describe, expect, it } from 'vitest';
import { simulateLineList } from '@/lib/grading';
import { compareLinesToPeaks, pickPeaks } from '@/lib/spectrum/peaks';
import { bandPlotModel, niceTicks, residualPlotModel } from '@/lib/spectrum/plot';
import { synthesizeSpectrum } from '@/lib/spectrum/synthesize';

// Positions from lib/grading simulateLineList (published constants, see lib/grading/reference.ts).
const lines = simulateLineList('H35Cl', { jMax: 6 });
const spectrum = synthesizeSpectrum({ lines, from: 2600, to: 3100, step: 0.25, fwhm: 0.8, noise: 0.002, seed: 1 });
const reported = lines.map((l) => ({ branch: l.branch, J: l.J, wavenumber: Math.round(l.wavenumber * 100) / 100 }));
const fake = { wavenumber: 2886.0 };
const peaks = pickPeaks(spectrum);
const comparison = compareLinesToPeaks([...reported, fake], peaks);

describe('niceTicks', () => {
  it('steps by 1, 2 or 5 × 10ⁿ within the range', () => {
    expect(niceTicks(2600, 3100, 5).values).toEqual([2600, 2700, 2800, 2900, 3000, 3100]);
    expect(niceTicks(-0.013, 0.021, 4)).toEqual({ values: [-0.01, 0, 0.01, 0.02], decimals: 2 });
  });
});

describe('bandPlotModel', () => {
  const model = bandPlotModel({ spectrum, lines: [...reported, fake], peaks, comparison, width: 800, height: 400 });

  it('draws wavenumber decreasing to the right, labelled in cm⁻¹', () => {
    expect(model.xAxis.label).toBe('Wavenumber / cm⁻¹');
    expect(model.xAxis.reversed).toBe(true);
    const [a, b] = model.xAxis.ticks;
    expect(b.value).toBeGreaterThan(a.value);
    expect(b.pos).toBeLessThan(a.pos);
    expect(model.yAxis.label).toBe('Absorbance');
    expect(model.curve.length).toBeGreaterThan(100);
    expect(
      model.curve.every(([x, y]) => x >= model.area.left - 0.01 && x <= model.area.left + model.area.width + 0.01 && y >= 0 && y <= 400),
    ).toBe(true);
  });

  it('places a labelled marker per reported line, P and R in different shapes', () => {
    const p3 = model.markers.find((m) => m.label === 'P(3)')!;
    const r0 = model.markers.find((m) => m.label === 'R(0)')!;
    expect(p3.shape).toBe('triangle-down');
    expect(r0.shape).toBe('circle');
    expect(r0.x).toBeLessThan(p3.x); // R(0) is at higher wavenumber, so further left
    expect(model.markers.filter((m) => m.group === 'P')).toHaveLength(6);
    expect(model.markers.filter((m) => m.group === 'R')).toHaveLength(7);
    expect(model.markers.filter((m) => m.group === 'peak').length).toBeGreaterThanOrEqual(13);
  });

  it('draws the line that matches no peak hollow, and says so', () => {
    const odd = model.markers.find((m) => m.value === 2886.0)!;
    expect(odd.group).toBe('unassigned');
    expect(odd.fill).toBe('hollow');
    expect(odd.note).toMatch(/no peak within tolerance/);
    expect(model.markers.filter((m) => m.fill === 'hollow')).toHaveLength(1);
    expect(model.description).toContain('; 1 reported line matches no peak');
  });

  it('plots transmittance on its own axis unless asked for absorbance', () => {
    const t = { ...spectrum, y: spectrum.y.map((a) => 10 ** -a), yKind: 'transmittance' as const };
    expect(bandPlotModel({ spectrum: t }).yAxis.label).toBe('Transmittance');
    expect(bandPlotModel({ spectrum: t, asAbsorbance: true }).yAxis.label).toBe('Absorbance');
  });

  it('thins a long spectrum to a few points per pixel column, keeping the peak tops', () => {
    const dense = synthesizeSpectrum({ lines, from: 2600, to: 3100, step: 0.005, fwhm: 0.8 });
    const m = bandPlotModel({ spectrum: dense, width: 600, xRange: [2600, 3100] });
    expect(m.curve.length).toBeLessThan(600 * 4);
    const topY = Math.min(...m.curve.map(([, y]) => y));
    const maxA = Math.max(...dense.y);
    const expected = m.area.top + ((m.yAxis.max - maxA) / (m.yAxis.max - m.yAxis.min)) * m.area.height;
    expect(Math.abs(topY - expected)).toBeLessThan(0.01);
    expect(topY).toBeLessThan(m.area.top + 0.06 * m.area.height);
  });
});

describe('residualPlotModel', () => {
  it('plots residuals against m with a zero line, P (m < 0) and R (m > 0) in different shapes', () => {
    const m = residualPlotModel([
      { m: -2, residual: 0.03 },
      { m: -1, residual: -0.01 },
      { m: 1, residual: 0.02 },
      { m: 2, residual: -0.04 },
    ]);
    expect(m.kind).toBe('residual');
    expect(m.zeroLine).toBeCloseTo(m.area.top + m.area.height / 2, 1);
    expect(m.markers.map((k) => k.shape)).toEqual(['triangle-down', 'triangle-down', 'circle', 'circle']);
    expect(m.markers[3].y).toBeGreaterThan(m.zeroLine!); // negative residual below the line
    expect(m.markers[0].note).toMatch(/P\(2\)/);
    expect(m.markers[2].note).toMatch(/R\(0\)/);
    expect(m.xAxis.label).toBe('Running index m');
    expect(m.yAxis.label).toBe('Residual / cm⁻¹');
  });
});
