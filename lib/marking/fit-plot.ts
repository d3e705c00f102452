/**
 * The fit of line position against running index m, as a plot model of the same shape as
 * lib/spectrum's, so the page (SVG) and the feedback PDF (pdf-lib) draw the same picture.
 */
import { niceTicks, residualPlotModel, type PlotModel } from '@/lib/spectrum';
import type { FitData } from './view';

const r2 = (v: number) => Math.round(v * 100) / 100;
const tick = (v: number, d: number) => v.toFixed(d).replace(/^-/, '−');

export function fitPlotModel(fit: FitData, options: { width?: number; height?: number } = {}): PlotModel {
  const width = options.width ?? 720;
  const height = options.height ?? 300;
  const pts = fit.residuals;
  const ms = pts.map((p) => p.m);
  const xmin = (ms.length ? Math.min(...ms) : -1) - 1;
  const xmax = (ms.length ? Math.max(...ms) : 1) + 1;
  const poly = (m: number) => fit.coefficients.reduce((s, c, i) => s + c * m ** i, 0);
  const ys = pts.map((p) => p.observed);
  if (fit.coefficients.length) for (let m = xmin; m <= xmax; m += 0.5) ys.push(poly(m));
  let ymin = ys.length ? Math.min(...ys) : 0;
  let ymax = ys.length ? Math.max(...ys) : 1;
  const pad = (ymax - ymin || 1) * 0.06;
  ymin -= pad;
  ymax += pad;
  const legendHeight = 22;
  const area = { left: 68, top: 16, width: width - 68 - 18, height: height - 16 - 48 - legendHeight };
  const px = (v: number) => area.left + ((v - xmin) / (xmax - xmin)) * area.width;
  const py = (v: number) => area.top + ((ymax - v) / (ymax - ymin)) * area.height;
  const xt = niceTicks(xmin, xmax, Math.max(3, Math.round(area.width / 70)));
  const yt = niceTicks(ymin, ymax, Math.max(3, Math.round(area.height / 45)));
  const curve: [number, number][] = [];
  if (fit.coefficients.length)
    for (let i = 0; i <= 120; i++) {
      const m = xmin + ((xmax - xmin) * i) / 120;
      curve.push([r2(px(m)), r2(py(poly(m)))]);
    }
  const ly = height - 10;
  return {
    kind: 'band',
    width,
    height,
    area,
    xAxis: {
      label: 'Running index m',
      min: xmin,
      max: xmax,
      reversed: false,
      ticks: xt.values.filter(Number.isInteger).map((v) => ({ value: v, pos: r2(px(v)), label: tick(v, 0) })),
    },
    yAxis: {
      label: 'Line position ν̃ / cm⁻¹',
      min: ymin,
      max: ymax,
      reversed: false,
      ticks: yt.values.map((v) => ({ value: v, pos: r2(py(v)), label: tick(v, yt.decimals) })),
    },
    curve,
    markers: pts.map((p) => ({
      x: r2(px(p.m)),
      y: r2(py(p.observed)),
      shape: p.m < 0 ? ('triangle-down' as const) : ('circle' as const),
      group: p.m < 0 ? ('P' as const) : ('R' as const),
      fill: 'solid' as const,
      value: p.m,
      note: `${p.branch}(${p.J}) at ${p.observed.toFixed(2)} cm⁻¹, fitted ${p.calculated.toFixed(2)} cm⁻¹`,
    })),
    zeroLine: null,
    legend: [
      { x: area.left, y: ly, shape: 'triangle-down', group: 'P', fill: 'solid', text: 'P branch (m < 0)' },
      { x: area.left + 140, y: ly, shape: 'circle', group: 'R', fill: 'solid', text: 'R branch (m > 0)' },
    ],
    description: `Line positions of ${pts.length} lines against m with the fitted polynomial${fit.rms !== null ? `, root-mean-square residual ${fit.rms.toFixed(3)} cm⁻¹` : ''}.`,
  };
}

export function residualModel(fit: FitData, options: { width?: number; height?: number } = {}): PlotModel {
  return residualPlotModel(
    fit.residuals.map((r) => ({ m: r.m, residual: r.residual })),
    options,
  );
}
