/**
 * Plots as plain data. The model holds only numbers (pixels from the top-left corner) and
 * strings; components/plots/plot-figure.tsx draws it on screen and lib/pdf/draw-plot.ts in the
 * feedback PDF, both with the marker styles of ./plot-style.ts.
 *
 * Band plots follow the usual infrared practice: wavenumber decreases from left to right.
 */
import type { LinePeakComparison, Peak, ReportedLine } from './peaks';
import { toAbsorbance } from './peaks';
import { MARKER_SHAPE, MARKER_SIZE, type MarkerGroup, type MarkerShape } from './plot-style';
import type { Spectrum } from './types';

export type { MarkerGroup, MarkerShape } from './plot-style';

export interface PlotTick {
  value: number;
  /** Pixel position along the axis (x for the x axis, y for the y axis). */
  pos: number;
  label: string;
}

export interface PlotAxis {
  label: string;
  min: number;
  max: number;
  /** True when values decrease along the axis's drawing direction (left→right, or bottom→top). */
  reversed: boolean;
  ticks: PlotTick[];
}

export interface PlotArea {
  left: number;
  top: number;
  width: number;
  height: number;
}

export interface PlotMarker {
  x: number;
  y: number;
  shape: MarkerShape;
  group: MarkerGroup;
  /** Solid when the line matched a peak (or was not checked); hollow when it matched none. */
  fill: 'solid' | 'hollow';
  /** Data value along x (wavenumber or m). */
  value: number;
  label?: string;
  /** Degrees, counter-clockwise positive as in pdf-lib; SVG rotates by the negative. */
  labelAngle?: number;
  labelX?: number;
  labelY?: number;
  /** Vertical guide from y1 to y2 (pixels), dashed when hollow. */
  guide?: { y1: number; y2: number };
  /** One sentence for a tooltip or screen reader. */
  note: string;
}

export interface LegendItem {
  x: number;
  y: number;
  shape: MarkerShape;
  group: MarkerGroup;
  fill: 'solid' | 'hollow';
  text: string;
}

export interface PlotModel {
  kind: 'band' | 'residual';
  width: number;
  height: number;
  area: PlotArea;
  xAxis: PlotAxis;
  yAxis: PlotAxis;
  /** Polyline through the data, as [x, y] pixel pairs (empty for the residual plot). */
  curve: [number, number][];
  markers: PlotMarker[];
  /** Pixel y of the zero line (residual plot), else null. */
  zeroLine: number | null;
  legend: LegendItem[];
  /** A plain-language summary for screen readers. */
  description: string;
}

/** Tick values at 1, 2 or 5 × 10ⁿ, about `target` of them. */
export function niceTicks(min: number, max: number, target = 6): { values: number[]; decimals: number } {
  if (!(max > min)) return { values: [min], decimals: 0 };
  const raw = (max - min) / Math.max(1, target);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const norm = raw / mag;
  const step = (norm < 1.5 ? 1 : norm < 3.5 ? 2 : norm < 7.5 ? 5 : 10) * mag;
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  const values: number[] = [];
  for (let v = Math.ceil(min / step - 1e-9) * step; v <= max + step * 1e-9; v += step) {
    values.push(Number(v.toFixed(decimals)));
  }
  return { values, decimals };
}

function round2(v: number): number {
  return Math.round(v * 100) / 100;
}

function formatTick(v: number, decimals: number): string {
  // U+2212 minus, as typeset.
  return v.toFixed(decimals).replace(/^-/, '−');
}

function lineLabelOf(l: ReportedLine): string {
  return l.branch !== undefined && l.J !== undefined ? `${l.branch}(${l.J})` : '';
}

/**
 * The polyline through the points with index order `order`, thinned when dense: per pixel
 * column it keeps the first, lowest, highest and last point, so peak tops survive.
 */
function polyline(n: number, xAt: (k: number) => number, yAt: (k: number) => number, columns: number): [number, number][] {
  const out: [number, number][] = [];
  if (n <= columns * 3) {
    for (let k = 0; k < n; k++) out.push([round2(xAt(k)), round2(yAt(k))]);
    return out;
  }
  let col = Number.NaN;
  let first = -1;
  let lo = -1;
  let hi = -1;
  let last = -1;
  const flush = () => {
    if (first < 0) return;
    const keep = Array.from(new Set([first, lo, hi, last])).sort((p, q) => p - q);
    for (const k of keep) out.push([round2(xAt(k)), round2(yAt(k))]);
  };
  for (let k = 0; k < n; k++) {
    const c = Math.floor(xAt(k));
    const y = yAt(k);
    if (c !== col) {
      flush();
      col = c;
      first = lo = hi = last = k;
      continue;
    }
    if (y < yAt(lo)) lo = k;
    if (y > yAt(hi)) hi = k;
    last = k;
  }
  flush();
  return out;
}

export interface BandPlotInput {
  spectrum: Spectrum;
  lines?: ReportedLine[];
  peaks?: Peak[];
  /** When given, lines with no peak within tolerance are drawn hollow. */
  comparison?: LinePeakComparison;
  width?: number;
  height?: number;
  /** Wavenumber range to show, cm⁻¹; by default the reported lines with a margin, else the whole spectrum. */
  xRange?: [number, number];
  /** Plot absorbance even for a transmittance spectrum. */
  asAbsorbance?: boolean;
}

/** Wavenumber range shown: as asked, else the reported lines with a margin, else the whole spectrum. */
function bandXRange(input: BandPlotInput, lines: ReportedLine[]): [number, number] {
  const { spectrum } = input;
  const n = spectrum.x.length;
  let [xmin, xmax] = input.xRange ?? [spectrum.x[0], spectrum.x[n - 1]];
  if (!input.xRange && lines.length > 0) {
    const lo = lines.reduce((m, l) => Math.min(m, l.wavenumber), Infinity);
    const hi = lines.reduce((m, l) => Math.max(m, l.wavenumber), -Infinity);
    const pad = Math.max(15, 0.08 * (hi - lo));
    xmin = Math.max(spectrum.x[0], lo - pad);
    xmax = Math.min(spectrum.x[n - 1], hi + pad);
    if (!(xmax > xmin)) [xmin, xmax] = [lo - pad, hi + pad];
  }
  if (xmin > xmax) [xmin, xmax] = [xmax, xmin];
  if (xmax === xmin) {
    xmin -= 1;
    xmax += 1;
  }
  return [xmin, xmax];
}

/** The y range of the points within [xmin, xmax], with 5 % room above and below. */
function bandYRange(x: ArrayLike<number>, yValues: ArrayLike<number>, xmin: number, xmax: number): [number, number] {
  let ymin = Infinity;
  let ymax = -Infinity;
  for (let i = 0; i < x.length; i++) {
    if (x[i] < xmin || x[i] > xmax) continue;
    ymin = Math.min(ymin, yValues[i]);
    ymax = Math.max(ymax, yValues[i]);
  }
  if (!Number.isFinite(ymin)) {
    ymin = 0;
    ymax = 1;
  }
  if (ymax === ymin) {
    ymin -= 0.5;
    ymax += 0.5;
  }
  const ypad = 0.05 * (ymax - ymin);
  return [ymin - ypad, ymax + ypad];
}

/** Where a band plot draws: the plotting area and the data-to-pixel maps (wavenumber decreasing to the right). */
interface BandFrame {
  width: number;
  height: number;
  area: PlotArea;
  xmin: number;
  xmax: number;
  px: (v: number) => number;
  py: (v: number) => number;
  yIsAbsorbance: boolean;
  yValues: ArrayLike<number>;
  legendHeight: number;
}

function bandAxes(f: BandFrame, ymin: number, ymax: number): { xAxis: PlotAxis; yAxis: PlotAxis } {
  const { area, xmin, xmax, px, py } = f;
  const xt = niceTicks(xmin, xmax, Math.max(3, Math.round(area.width / 90)));
  const yt = niceTicks(ymin, ymax, Math.max(3, Math.round(area.height / 50)));
  const xAxis: PlotAxis = {
    label: 'Wavenumber / cm⁻¹',
    min: xmin,
    max: xmax,
    reversed: true,
    ticks: xt.values.map((v) => ({ value: v, pos: round2(px(v)), label: formatTick(v, xt.decimals) })),
  };
  const yAxis: PlotAxis = {
    label: f.yIsAbsorbance ? 'Absorbance' : 'Transmittance',
    min: ymin,
    max: ymax,
    reversed: false,
    ticks: yt.values.map((v) => ({ value: v, pos: round2(py(v)), label: formatTick(v, yt.decimals) })),
  };
  return { xAxis, yAxis };
}

/** The spectrum's points inside the range, drawn left to right (high wavenumber first). */
function bandCurve(spectrum: Spectrum, f: BandFrame): [number, number][] {
  const n = spectrum.x.length;
  let iHi = n - 1;
  while (iHi >= 0 && spectrum.x[iHi] > f.xmax) iHi--;
  let iLo = 0;
  while (iLo < n && spectrum.x[iLo] < f.xmin) iLo++;
  const count = Math.max(0, iHi - iLo + 1);
  return polyline(
    count,
    (k) => f.px(spectrum.x[iHi - k]),
    (k) => f.py(f.yValues[iHi - k]),
    Math.ceil(f.area.width),
  );
}

/** Pixel height of the curve at a wavenumber (linear between points), for the guide lines. */
function curveHeightAt(spectrum: Spectrum, f: BandFrame, w: number): number {
  const xs = spectrum.x;
  const yValues = f.yValues;
  let lo = 0;
  let hi = xs.length - 1;
  if (w <= xs[0]) return f.py(yValues[0]);
  if (w >= xs[hi]) return f.py(yValues[hi]);
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (xs[mid] <= w) lo = mid;
    else hi = mid;
  }
  const t = (w - xs[lo]) / (xs[hi] - xs[lo]);
  return f.py(yValues[lo] + t * (yValues[hi] - yValues[lo]));
}

/** A marker above the plot per reported line in range, hollow when the comparison found no peak for it. */
function reportedLineMarkers(input: BandPlotInput, lines: ReportedLine[], f: BandFrame): PlotMarker[] {
  const { area } = f;
  const checkOf = new Map<ReportedLine, { matched: boolean; distance: number | null }>();
  for (const c of input.comparison?.lines ?? []) checkOf.set(c.line, c);
  const markerY = area.top - 10;
  const markers: PlotMarker[] = [];
  for (const l of lines) {
    if (l.wavenumber < f.xmin || l.wavenumber > f.xmax) continue;
    const label = lineLabelOf(l);
    const group: MarkerGroup = l.branch === 'P' ? 'P' : l.branch === 'R' ? 'R' : 'unassigned';
    const check = checkOf.get(l);
    const hollow = check ? !check.matched : false;
    const x = round2(f.px(l.wavenumber));
    const name = label || 'Unassigned line';
    const note =
      `${name} at ${l.wavenumber} cm⁻¹` +
      (check
        ? check.matched
          ? `, matches a peak (${(check.distance ?? 0) >= 0 ? '+' : '−'}${Math.abs(check.distance ?? 0).toFixed(2)} cm⁻¹)`
          : ', no peak within tolerance'
        : '');
    markers.push({
      x,
      y: markerY,
      shape: MARKER_SHAPE[group],
      group,
      fill: hollow ? 'hollow' : 'solid',
      value: l.wavenumber,
      label: label || undefined,
      labelAngle: label ? 90 : undefined,
      labelX: label ? x + 3.5 : undefined,
      labelY: label ? markerY - MARKER_SIZE - 3 : undefined,
      guide: {
        y1: round2(area.top),
        y2: round2(Math.min(area.top + area.height, Math.max(area.top, curveHeightAt(input.spectrum, f, l.wavenumber)))),
      },
      note,
    });
  }
  return markers;
}

/** A tick at each picked peak in range, just off the curve. */
function peakMarkers(spectrum: Spectrum, peaks: Peak[], f: BandFrame): PlotMarker[] {
  const { area } = f;
  let yTop = -Infinity;
  for (const v of spectrum.y) if (v > yTop) yTop = v;
  const percent = spectrum.yKind === 'transmittance' && yTop > 1.5 ? 100 : 1;
  const markers: PlotMarker[] = [];
  for (const p of peaks) {
    if (p.wavenumber < f.xmin || p.wavenumber > f.xmax) continue;
    // Peak heights are absorbance; draw them on the axis shown.
    const h = f.yIsAbsorbance ? p.height : 10 ** -p.height * percent;
    markers.push({
      x: round2(f.px(p.wavenumber)),
      y: round2(Math.max(area.top, Math.min(area.top + area.height, f.py(h) + (f.yIsAbsorbance ? -6 : 6)))),
      shape: MARKER_SHAPE.peak,
      group: 'peak',
      fill: 'solid',
      value: p.wavenumber,
      note: `Peak picked at ${p.wavenumber.toFixed(2)} cm⁻¹`,
    });
  }
  return markers;
}

/** One legend entry per marker group shown (and one for hollow markers), in a row under the plot. */
function bandLegend(markers: PlotMarker[], f: BandFrame): LegendItem[] {
  const legend: LegendItem[] = [];
  if (f.legendHeight === 0) return legend;
  const items: Omit<LegendItem, 'x' | 'y'>[] = [];
  const groups = new Set(markers.map((m) => m.group));
  const LEGEND_TEXT: Record<MarkerGroup, string> = { P: 'P branch', R: 'R branch', unassigned: 'unassigned', peak: 'picked peak' };
  for (const group of ['P', 'R', 'unassigned', 'peak'] as const) {
    if (groups.has(group)) items.push({ shape: MARKER_SHAPE[group], group, fill: 'solid', text: LEGEND_TEXT[group] });
  }
  if (markers.some((m) => m.fill === 'hollow')) {
    items.push({ shape: MARKER_SHAPE.unassigned, group: 'unassigned', fill: 'hollow', text: 'hollow marker: no peak within tolerance' });
  }
  let lx = f.area.left;
  const ly = f.height - 10;
  for (const it of items) {
    legend.push({ ...it, x: lx, y: ly });
    lx += 22 + it.text.length * 6.2;
  }
  return legend;
}

function bandDescription(input: BandPlotInput, markers: PlotMarker[], f: BandFrame, hasMarkers: boolean, peakCount: number): string {
  const countOf = (g: MarkerGroup) => markers.filter((m) => m.group === g).length;
  const unmatched = markers.filter((m) => m.fill === 'hollow').length;
  return (
    `${f.yIsAbsorbance ? 'Absorbance' : 'Transmittance'} from ${f.xmax.toFixed(0)} to ${f.xmin.toFixed(0)} cm⁻¹` +
    (hasMarkers ? `, with ${countOf('P')} P-branch, ${countOf('R')} R-branch and ${countOf('unassigned')} unassigned reported lines` : '') +
    (input.comparison ? `; ${unmatched} reported line${unmatched === 1 ? ' matches' : 's match'} no peak` : '') +
    (peakCount > 0 ? `; ${countOf('peak')} picked peaks shown` : '') +
    '.'
  );
}

export function bandPlotModel(input: BandPlotInput): PlotModel {
  const width = input.width ?? 720;
  const height = input.height ?? 380;
  const { spectrum } = input;
  const lines = input.lines ?? [];
  const peaks = input.peaks ?? [];
  const useAbsorbance = input.asAbsorbance === true && spectrum.yKind === 'transmittance';
  const yValues = useAbsorbance ? toAbsorbance(spectrum) : spectrum.y;
  const yIsAbsorbance = useAbsorbance || spectrum.yKind === 'absorbance';

  const [xmin, xmax] = bandXRange(input, lines);
  const [ymin, ymax] = bandYRange(spectrum.x, yValues, xmin, xmax);

  // The area leaves room above for the line markers and their labels, below for the legend.
  const hasMarkers = lines.length > 0;
  const legendHeight = hasMarkers || peaks.length > 0 ? 22 : 0;
  const area: PlotArea = { left: 68, top: hasMarkers ? 16 + 58 : 16, width: width - 68 - 18, height: 0 };
  area.height = height - area.top - 48 - legendHeight;
  const frame: BandFrame = {
    width,
    height,
    area,
    xmin,
    xmax,
    px: (v) => area.left + ((xmax - v) / (xmax - xmin)) * area.width, // decreasing to the right
    py: (v) => area.top + ((ymax - v) / (ymax - ymin)) * area.height,
    yIsAbsorbance,
    yValues,
    legendHeight,
  };

  const { xAxis, yAxis } = bandAxes(frame, ymin, ymax);
  const curve = bandCurve(spectrum, frame);
  const markers = [...reportedLineMarkers(input, lines, frame), ...peakMarkers(spectrum, peaks, frame)];
  const legend = bandLegend(markers, frame);
  const description = bandDescription(input, markers, frame, hasMarkers, peaks.length);
  return { kind: 'band', width, height, area, xAxis, yAxis, curve, markers, zeroLine: null, legend, description };
}

export interface Residual {
  /** Running index: m = J + 1 for R(J), m = −J for P(J). */
  m: number;
  /** Observed minus fitted position, cm⁻¹. */
  residual: number;
}

export function residualPlotModel(residuals: Residual[], options: { width?: number; height?: number } = {}): PlotModel {
  const width = options.width ?? 720;
  const height = options.height ?? 260;
  const ms = residuals.map((r) => r.m);
  let xmin = ms.length ? ms.reduce((a, b) => Math.min(a, b)) - 1 : -1;
  let xmax = ms.length ? ms.reduce((a, b) => Math.max(a, b)) + 1 : 1;
  if (xmin === xmax) {
    xmin -= 1;
    xmax += 1;
  }
  const absMax = residuals.reduce((m, r) => Math.max(m, Math.abs(r.residual)), 0) || 0.1;
  const ymax = absMax * 1.15;
  const ymin = -ymax;
  const legendHeight = 22;
  const area: PlotArea = { left: 68, top: 16, width: width - 68 - 18, height: height - 16 - 48 - legendHeight };
  const px = (v: number) => area.left + ((v - xmin) / (xmax - xmin)) * area.width;
  const py = (v: number) => area.top + ((ymax - v) / (ymax - ymin)) * area.height;
  const xt = niceTicks(xmin, xmax, Math.max(3, Math.round(area.width / 70)));
  const xdec = 0;
  const yt = niceTicks(ymin, ymax, Math.max(3, Math.round(area.height / 45)));
  const xAxis: PlotAxis = {
    label: 'Running index m',
    min: xmin,
    max: xmax,
    reversed: false,
    ticks: xt.values.filter((v) => Number.isInteger(v)).map((v) => ({ value: v, pos: round2(px(v)), label: formatTick(v, xdec) })),
  };
  const yAxis: PlotAxis = {
    label: 'Residual / cm⁻¹',
    min: ymin,
    max: ymax,
    reversed: false,
    ticks: yt.values.map((v) => ({ value: v, pos: round2(py(v)), label: formatTick(v, yt.decimals) })),
  };
  const markers: PlotMarker[] = residuals.map((r) => {
    const group: MarkerGroup = r.m < 0 ? 'P' : 'R';
    const label = r.m < 0 ? `P(${-r.m})` : `R(${r.m - 1})`;
    return {
      x: round2(px(r.m)),
      y: round2(py(r.residual)),
      shape: MARKER_SHAPE[group],
      group,
      fill: 'solid',
      value: r.m,
      note: `${label} (m = ${r.m}): residual ${r.residual >= 0 ? '+' : '−'}${Math.abs(r.residual).toFixed(3)} cm⁻¹`,
    };
  });
  const ly = height - 10;
  const legend: LegendItem[] = [
    { x: area.left, y: ly, shape: MARKER_SHAPE.P, group: 'P', fill: 'solid', text: 'P branch (m < 0)' },
    { x: area.left + 140, y: ly, shape: MARKER_SHAPE.R, group: 'R', fill: 'solid', text: 'R branch (m > 0)' },
  ];
  const rms = residuals.length ? Math.sqrt(residuals.reduce((s, r) => s + r.residual ** 2, 0) / residuals.length) : 0;
  const description = `Residuals of ${residuals.length} lines against m, largest ${absMax.toFixed(3)} cm⁻¹, root mean square ${rms.toFixed(3)} cm⁻¹.`;
  return { kind: 'residual', width, height, area, xAxis, yAxis, curve: [], markers, zeroLine: round2(py(0)), legend, description };
}
