/** Draws a plot model (lib/spectrum's PlotModel) as vector graphics with pdf-lib. */
import { degrees, rgb, type PDFFont, type PDFPage, type RGB } from 'pdf-lib';
import type { PlotModel } from '@/lib/spectrum';
import { hexToUnitRgb, isOutlined, markerPath, MARKER_SIZE, PLOT_COLOURS, type PlotColourName } from '@/lib/spectrum/plot-style';
import { drawTextIn, textWidth } from './fonts';
import { INK } from './style';

/** The plot colours (lib/spectrum/plot-style.ts) as pdf-lib colours; axes in the ink of the text. */
const COLOURS = Object.fromEntries(
  (Object.keys(PLOT_COLOURS) as PlotColourName[]).map((name) => [name, rgb(...hexToUnitRgb(PLOT_COLOURS[name]))]),
) as Record<PlotColourName, RGB>;
const AXIS = INK;

const r2 = (v: number) => Math.round(v * 100) / 100;

/**
 * Draw `model` with its top-left corner at (left, top) in PDF points, scaled by `scale`.
 * pdf-lib's drawSvgPath takes SVG (y-down) coordinates relative to a point, so the model's
 * pixel coordinates are used as they are.
 */
export function drawPlot(
  page: PDFPage,
  model: PlotModel,
  opts: { left: number; top: number; scale: number; font: PDFFont; mono: PDFFont },
): void {
  const { left, top, scale: s, font, mono } = opts;
  const X = (x: number) => left + x * s;
  const Y = (y: number) => top - y * s;
  const { area, xAxis, yAxis } = model;
  const bottom = area.top + area.height;
  const right = area.left + area.width;
  // Lines of one style are drawn as one path: a path per line costs a graphics state, colour and
  // width each, and pdf-lib parses every path again.
  const lines = (segments: [number, number, number, number][], color: RGB, thickness: number, dash?: number[]) => {
    if (!segments.length) return;
    const d = segments.map(([x1, y1, x2, y2]) => `M${r2(x1 * s)} ${r2(y1 * s)}L${r2(x2 * s)} ${r2(y2 * s)}`).join('');
    page.drawSvgPath(d, { x: left, y: top, borderColor: color, borderWidth: thickness, borderDashArray: dash });
  };
  lines(
    [
      ...xAxis.ticks.map((t): [number, number, number, number] => [t.pos, area.top, t.pos, bottom]),
      ...yAxis.ticks.map((t): [number, number, number, number] => [area.left, t.pos, right, t.pos]),
    ],
    COLOURS.grid,
    0.3,
  );
  page.drawRectangle({
    x: X(area.left),
    y: Y(bottom),
    width: area.width * s,
    height: area.height * s,
    borderColor: AXIS,
    borderWidth: 0.7,
  });
  const tickSize = 11 * s;
  lines(
    [
      ...xAxis.ticks.map((t): [number, number, number, number] => [t.pos, bottom, t.pos, bottom + 5]),
      ...yAxis.ticks.map((t): [number, number, number, number] => [area.left - 5, t.pos, area.left, t.pos]),
    ],
    AXIS,
    0.7,
  );
  for (const t of xAxis.ticks) {
    const w = textWidth(t.label, mono, tickSize);
    drawTextIn(page, t.label, { x: X(t.pos) - w / 2, y: Y(bottom + 17), size: tickSize, font: mono, color: AXIS });
  }
  for (const t of yAxis.ticks) {
    const w = textWidth(t.label, mono, tickSize);
    drawTextIn(page, t.label, { x: X(area.left - 8) - w, y: Y(t.pos + 4), size: tickSize, font: mono, color: AXIS });
  }
  const xl = textWidth(xAxis.label, font, tickSize);
  drawTextIn(page, xAxis.label, { x: X(area.left + area.width / 2) - xl / 2, y: Y(bottom + 36), size: tickSize, font, color: AXIS });
  const yl = textWidth(yAxis.label, font, tickSize);
  drawTextIn(page, yAxis.label, {
    x: X(20),
    y: Y(area.top + area.height / 2) - yl / 2,
    size: tickSize,
    font,
    color: AXIS,
    rotate: degrees(90),
  });
  if (model.zeroLine !== null) lines([[area.left, model.zeroLine, right, model.zeroLine]], AXIS, 0.6, [3, 2]);
  if (model.curve.length > 1) {
    const d = model.curve.map(([x, y], i) => `${i ? 'L' : 'M'}${r2(x * s)} ${r2(y * s)}`).join('');
    page.drawSvgPath(d, { x: left, y: top, borderColor: AXIS, borderWidth: 0.8 });
  }
  // Markers (and their guides) of one colour and style as one path each.
  const guides = new Map<string, { colour: RGB; dash?: number[]; segments: [number, number, number, number][] }>();
  const markers = new Map<string, { colour: RGB; outlined: boolean; d: string }>();
  for (const m of model.markers) {
    const colour = COLOURS[m.group] ?? AXIS;
    if (m.guide) {
      const key = `${m.group}|${m.fill}`;
      const g = guides.get(key) ?? guides.set(key, { colour, dash: m.fill === 'hollow' ? [2, 1.5] : undefined, segments: [] }).get(key)!;
      g.segments.push([m.x, m.guide.y1, m.x, m.guide.y2]);
    }
    const outlined = isOutlined(m);
    const key = `${m.group}|${outlined}`;
    const group = markers.get(key) ?? markers.set(key, { colour, outlined, d: '' }).get(key)!;
    group.d += markerPath(m.shape, m.x * s, m.y * s, MARKER_SIZE * s);
  }
  for (const g of guides.values()) lines(g.segments, g.colour, 0.5, g.dash);
  for (const { colour, outlined, d } of markers.values()) {
    if (outlined) page.drawSvgPath(d, { x: left, y: top, borderColor: colour, borderWidth: 0.8 });
    else page.drawSvgPath(d, { x: left, y: top, color: colour, borderColor: colour, borderWidth: 0.5 });
  }
  for (const l of model.legend) {
    const colour = COLOURS[l.group] ?? AXIS;
    page.drawSvgPath(markerPath(l.shape, (l.x + 5) * s, (l.y - 4) * s, MARKER_SIZE * s), {
      x: left,
      y: top,
      color: colour,
      borderColor: colour,
      borderWidth: 0.5,
    });
    drawTextIn(page, l.text, { x: X(l.x + 14), y: Y(l.y), size: tickSize, font, color: AXIS });
  }
}
