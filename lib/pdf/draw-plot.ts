/** Draws a plot model (lib/spectrum's PlotModel) as vector graphics with pdf-lib. */
import { degrees, rgb, type PDFFont, type PDFPage, type RGB } from 'pdf-lib';
import type { PlotModel } from '@/lib/spectrum';
import { hexToUnitRgb, isOutlined, markerPath, MARKER_SIZE, PLOT_COLOURS, type PlotColourName } from '@/lib/spectrum/plot-style';
import { textWidth } from './fonts';
import { INK } from './style';

/** The plot colours (lib/spectrum/plot-style.ts) as pdf-lib colours; axes in the ink of the text. */
const COLOURS = Object.fromEntries(
  (Object.keys(PLOT_COLOURS) as PlotColourName[]).map((name) => [name, rgb(...hexToUnitRgb(PLOT_COLOURS[name]))]),
) as Record<PlotColourName, RGB>;
const AXIS = INK;

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
  const line = (x1: number, y1: number, x2: number, y2: number, color: RGB, thickness = 0.5, dash?: number[]) =>
    page.drawLine({ start: { x: X(x1), y: Y(y1) }, end: { x: X(x2), y: Y(y2) }, thickness, color, dashArray: dash });
  for (const t of xAxis.ticks) line(t.pos, area.top, t.pos, bottom, COLOURS.grid, 0.3);
  for (const t of yAxis.ticks) line(area.left, t.pos, right, t.pos, COLOURS.grid, 0.3);
  page.drawRectangle({
    x: X(area.left),
    y: Y(bottom),
    width: area.width * s,
    height: area.height * s,
    borderColor: AXIS,
    borderWidth: 0.7,
  });
  const tickSize = 11 * s;
  for (const t of xAxis.ticks) {
    line(t.pos, bottom, t.pos, bottom + 5, AXIS, 0.7);
    const w = textWidth(t.label, mono, tickSize);
    page.drawText(t.label, { x: X(t.pos) - w / 2, y: Y(bottom + 17), size: tickSize, font: mono, color: AXIS });
  }
  for (const t of yAxis.ticks) {
    line(area.left - 5, t.pos, area.left, t.pos, AXIS, 0.7);
    const w = textWidth(t.label, mono, tickSize);
    page.drawText(t.label, { x: X(area.left - 8) - w, y: Y(t.pos + 4), size: tickSize, font: mono, color: AXIS });
  }
  const xl = textWidth(xAxis.label, font, tickSize);
  page.drawText(xAxis.label, { x: X(area.left + area.width / 2) - xl / 2, y: Y(bottom + 36), size: tickSize, font, color: AXIS });
  const yl = textWidth(yAxis.label, font, tickSize);
  page.drawText(yAxis.label, {
    x: X(20),
    y: Y(area.top + area.height / 2) - yl / 2,
    size: tickSize,
    font,
    color: AXIS,
    rotate: degrees(90),
  });
  if (model.zeroLine !== null) line(area.left, model.zeroLine, right, model.zeroLine, AXIS, 0.6, [3, 2]);
  if (model.curve.length > 1) {
    const d = model.curve.map(([x, y], i) => `${i ? 'L' : 'M'}${x * s} ${y * s}`).join(' ');
    page.drawSvgPath(d, { x: left, y: top, borderColor: AXIS, borderWidth: 0.8 });
  }
  for (const m of model.markers) {
    const colour = COLOURS[m.group] ?? AXIS;
    if (m.guide) line(m.x, m.guide.y1, m.x, m.guide.y2, colour, 0.5, m.fill === 'hollow' ? [2, 1.5] : undefined);
    const path = markerPath(m.shape, m.x * s, m.y * s, MARKER_SIZE * s);
    if (isOutlined(m)) page.drawSvgPath(path, { x: left, y: top, borderColor: colour, borderWidth: 0.8 });
    else page.drawSvgPath(path, { x: left, y: top, color: colour, borderColor: colour, borderWidth: 0.5 });
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
    page.drawText(l.text, { x: X(l.x + 14), y: Y(l.y), size: tickSize, font, color: AXIS });
  }
}
