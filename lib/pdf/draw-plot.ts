/** Draws a plot model (lib/spectrum's PlotModel) as vector graphics with pdf-lib. */
import { degrees, rgb, type PDFFont, type PDFPage, type RGB } from 'pdf-lib';
import type { PlotModel, MarkerShape } from '@/lib/spectrum';
import { textWidth } from './feedback';

const COLOURS: Record<string, RGB> = {
  axis: rgb(0.11, 0.15, 0.19),
  grid: rgb(0.83, 0.83, 0.83),
  P: rgb(0xa3 / 255, 0x40 / 255, 0x0b / 255),
  R: rgb(0x1d / 255, 0x5a / 255, 0x9e / 255),
  unassigned: rgb(0.3, 0.3, 0.3),
  peak: rgb(0.36, 0.36, 0.36),
};

function shapeSvgPath(shape: MarkerShape, x: number, y: number, s = 7): string {
  const h = s / 2;
  switch (shape) {
    case 'triangle-down':
      return `M${x - h} ${y - h} L${x + h} ${y - h} L${x} ${y + h} Z`;
    case 'diamond':
      return `M${x} ${y - h} L${x + h} ${y} L${x} ${y + h} L${x - h} ${y} Z`;
    case 'tick':
      return `M${x} ${y - h} L${x} ${y + h}`;
    case 'circle':
      return `M${x - h} ${y} A${h} ${h} 0 1 0 ${x + h} ${y} A${h} ${h} 0 1 0 ${x - h} ${y} Z`;
  }
}

/**
 * Draw `model` with its top-left corner at (left, top) in PDF points, scaled by `scale`.
 * pdf-lib's drawSvgPath takes SVG (y-down) coordinates relative to a point, so the model's
 * pixel coordinates are used as they are.
 */
export function drawPlot(page: PDFPage, model: PlotModel, opts: { left: number; top: number; scale: number; font: PDFFont; mono: PDFFont }): void {
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
  page.drawRectangle({ x: X(area.left), y: Y(bottom), width: area.width * s, height: area.height * s, borderColor: COLOURS.axis, borderWidth: 0.7 });
  const tickSize = 11 * s;
  for (const t of xAxis.ticks) {
    line(t.pos, bottom, t.pos, bottom + 5, COLOURS.axis, 0.7);
    const w = textWidth(t.label, mono, tickSize);
    page.drawText(t.label, { x: X(t.pos) - w / 2, y: Y(bottom + 17), size: tickSize, font: mono, color: COLOURS.axis });
  }
  for (const t of yAxis.ticks) {
    line(area.left - 5, t.pos, area.left, t.pos, COLOURS.axis, 0.7);
    const w = textWidth(t.label, mono, tickSize);
    page.drawText(t.label, { x: X(area.left - 8) - w, y: Y(t.pos + 4), size: tickSize, font: mono, color: COLOURS.axis });
  }
  const xl = textWidth(xAxis.label, font, tickSize);
  page.drawText(xAxis.label, { x: X(area.left + area.width / 2) - xl / 2, y: Y(bottom + 36), size: tickSize, font, color: COLOURS.axis });
  const yl = textWidth(yAxis.label, font, tickSize);
  page.drawText(yAxis.label, { x: X(20), y: Y(area.top + area.height / 2) - yl / 2, size: tickSize, font, color: COLOURS.axis, rotate: degrees(90) });
  if (model.zeroLine !== null) line(area.left, model.zeroLine, right, model.zeroLine, COLOURS.axis, 0.6, [3, 2]);
  if (model.curve.length > 1) {
    const d = model.curve.map(([x, y], i) => `${i ? 'L' : 'M'}${x * s} ${y * s}`).join(' ');
    page.drawSvgPath(d, { x: left, y: top, borderColor: COLOURS.axis, borderWidth: 0.8 });
  }
  for (const m of model.markers) {
    const colour = COLOURS[m.group] ?? COLOURS.axis;
    if (m.guide) line(m.x, m.guide.y1, m.x, m.guide.y2, colour, 0.5, m.fill === 'hollow' ? [2, 1.5] : undefined);
    const path = shapeSvgPath(m.shape, m.x * s, m.y * s, 7 * s);
    if (m.shape === 'tick' || m.fill === 'hollow') page.drawSvgPath(path, { x: left, y: top, borderColor: colour, borderWidth: 0.8 });
    else page.drawSvgPath(path, { x: left, y: top, color: colour, borderColor: colour, borderWidth: 0.5 });
  }
  for (const l of model.legend) {
    const colour = COLOURS[l.group] ?? COLOURS.axis;
    page.drawSvgPath(shapeSvgPath(l.shape, (l.x + 5) * s, (l.y - 4) * s, 7 * s), { x: left, y: top, color: colour, borderColor: colour, borderWidth: 0.5 });
    page.drawText(l.text, { x: X(l.x + 14), y: Y(l.y), size: tickSize, font, color: COLOURS.axis });
  }
}
