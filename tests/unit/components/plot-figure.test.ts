import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { simulateLineList } from '@/lib/grading';
import { compareLinesToPeaks, pickPeaks } from '@/lib/spectrum/peaks';
import { bandPlotModel, residualPlotModel } from '@/lib/spectrum/plot';
import { synthesizeSpectrum } from '@/lib/spectrum/synthesize';
import { PlotFigure } from '@/components/plots/plot-figure';

// Positions from lib/grading simulateLineList (published constants, see lib/grading/reference.ts).
const lines = simulateLineList('H35Cl', { jMax: 5 });
const spectrum = synthesizeSpectrum({ lines, from: 2600, to: 3100, step: 0.25, fwhm: 0.8, noise: 0.002, seed: 3 });
const reported = [
  ...lines.map((l) => ({ branch: l.branch, J: l.J, wavenumber: Math.round(l.wavenumber * 100) / 100 })),
  { wavenumber: 2886.0 },
];
const peaks = pickPeaks(spectrum);
const model = bandPlotModel({
  spectrum,
  lines: reported,
  peaks,
  comparison: compareLinesToPeaks(reported, peaks),
  width: 800,
  height: 400,
});
const html = renderToStaticMarkup(createElement(PlotFigure, { model, title: 'Spectrum <a> & b', idPrefix: 'spec 7' }));

describe('PlotFigure', () => {
  it('is one image named by its title and described by the model', () => {
    expect(html.match(/<svg /g)).toHaveLength(1);
    expect(html).toContain('role="img"');
    expect(html).toContain('aria-labelledby="spec7-title"');
    expect(html).toContain('aria-describedby="spec7-desc"');
    expect(html).toContain('<title id="spec7-title">Spectrum &lt;a&gt; &amp; b</title>');
    expect(html).toContain(`<desc id="spec7-desc">${model.description}</desc>`);
    expect(html).toContain(`viewBox="0 0 ${model.width} ${model.height}"`);
  });

  it('draws every marker of the model in order, hollow ones marked unmatched, each with its note', () => {
    const values = [...html.matchAll(/class="marker marker-[A-Za-z]+[^"]*" data-value="([^"]+)"/g)].map((m) => Number(m[1]));
    expect(values).toEqual(model.markers.map((m) => m.value));
    expect(html.match(/marker-unmatched/g)?.length ?? 0).toBe(model.markers.filter((m) => m.fill === 'hollow').length);
    expect(model.markers.some((m) => m.fill === 'hollow')).toBe(true); // the invented line at 2886.0 matches no peak
    for (const m of model.markers)
      expect(html).toContain(`<title>${m.note.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;')}</title>`);
  });

  it('draws the curve through the model’s points and every tick label', () => {
    expect(html).toContain(`points="${model.curve.map(([x, y]) => `${x},${y}`).join(' ')}"`);
    for (const t of [...model.xAxis.ticks, ...model.yAxis.ticks]) expect(html).toContain(`>${t.label}</text>`);
    expect(html).toContain(`>${model.xAxis.label}</text>`);
  });

  it('draws a residual plot’s zero line and legend', () => {
    const res = residualPlotModel([
      { m: -2, residual: 0.01 },
      { m: -1, residual: -0.02 },
      { m: 1, residual: 0.015 },
      { m: 2, residual: -0.005 },
    ]);
    const out = renderToStaticMarkup(createElement(PlotFigure, { model: res, title: 'Residuals', idPrefix: 'res-0' }));
    expect(out).toContain('class="zero-line"');
    expect(out).toContain('oscillab-plot-residual');
    for (const l of res.legend) expect(out).toContain(`>${l.text.replace(/</g, '&lt;').replace(/>/g, '&gt;')}</text>`);
  });

  it('draws P and R markers with shapes that differ without colour, colours as CSS variables', () => {
    const pPath = /class="marker marker-P"[^]*?<path d="([^"]+)"/.exec(html)![1];
    const rPath = /class="marker marker-R"[^]*?<path d="([^"]+)"/.exec(html)![1];
    expect(pPath).toMatch(/H/); // triangle: a flat top edge
    expect(rPath).toMatch(/a3\.5 3\.5/); // circle: two arcs
    expect(html).toContain('var(--plot-branch-p, #a3400b)');
    expect(html).toContain('stroke:currentColor');
  });
});
