/**
 * One-page PDF summary of a cohort's statistics, built with pdf-lib. The charts are vector
 * drawings (lines and rectangles), not images; DejaVu fonts (public/fonts) are embedded as
 * subsets because the standard PDF fonts lack ν̃, μ, ₑ and −. Verdict shares are printed as words
 * and numbers, and the box-plot boxes are hatched, so a grey-scale print reads the same.
 */
import fs from 'node:fs';
import path from 'node:path';
import fontkit from '@pdf-lib/fontkit';
import { PDFDocument, rgb, type PDFFont, type PDFPage } from 'pdf-lib';
import type { PracticalReport } from './report';
import { formatPercent, quantityLabel, symlog, SYMLOG_TICKS, tickLabel } from './scale';

const A4 = { width: 595.28, height: 841.89 };
const M = 40;
const INK = rgb(0.11, 0.15, 0.19);
const SOFT = rgb(0.29, 0.33, 0.38);
const RULE = rgb(0.75, 0.73, 0.66);
const ACCENT = rgb(0.12, 0.37, 0.45);

let fonts: { regular: Buffer; bold: Buffer } | null = null;
function fontBytes() {
  if (!fonts) {
    const dir = path.join(/*turbopackIgnore: true*/ process.cwd(), 'public', 'fonts');
    fonts = { regular: fs.readFileSync(path.join(dir, 'DejaVuSans.ttf')), bold: fs.readFileSync(path.join(dir, 'DejaVuSans-Bold.ttf')) };
  }
  return fonts;
}

export async function summaryPdf(report: PracticalReport, generatedAt = new Date()): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  const bytes = fontBytes();
  const regular = await doc.embedFont(bytes.regular, { subset: true });
  const bold = await doc.embedFont(bytes.bold, { subset: true });
  doc.setTitle(`Cohort statistics: ${report.practical.title}, ${report.scope.label}`);
  doc.setCreator('Oscillab');
  const page = doc.addPage([A4.width, A4.height]);
  let y = A4.height - M;

  const text = (t: string, x: number, yy: number, size = 9, font: PDFFont = regular, color = INK) =>
    page.drawText(t, { x, y: yy, size, font, color });
  const fit = (t: string, width: number, size: number, font: PDFFont = regular) => {
    let s = t;
    while (s.length > 1 && font.widthOfTextAtSize(s, size) > width) s = s.slice(0, -2) + '…';
    return s;
  };

  text('Cohort statistics', M, y, 16, bold);
  y -= 18;
  text(fit(`${report.practical.title} — ${report.scope.label}`, A4.width - 2 * M, 11, bold), M, y, 11, bold, SOFT);
  y -= 14;
  text(`Generated ${generatedAt.toISOString().slice(0, 16).replace('T', ' ')} UTC by Oscillab`, M, y, 8, regular, SOFT);
  y -= 20;

  const c = report.counts;
  text(`Students ${c.students}   Submitted ${c.submitted}   On time ${c.onTime}   Late ${c.late}   Marked ${c.marked}   Released ${c.released}`, M, y, 10, bold);
  y -= 18;

  if (report.suppressed) {
    text(`Fewer than ${report.minGroup} students in this group: counts only, no distributions or means.`, M, y, 9, regular, SOFT);
    y -= 20;
  } else {
    y = boxPlots(page, report, y, regular, bold);
    y = histograms(page, report, y - 8, regular, bold);
  }
  slipTable(page, report, y - 10, regular, bold);
  return doc.save();
}

function boxPlots(page: PDFPage, report: PracticalReport, top: number, regular: PDFFont, bold: PDFFont): number {
  const rows = report.quantities.filter((q) => !q.suppressed && q.box).slice(0, 10);
  page.drawText('Relative deviation per quantity (box: quartiles, bar: median, whiskers: min–max; log-scaled axis)', { x: M, y: top, size: 10, font: bold, color: INK });
  let y = top - 14;
  const labelW = 170, shareW = 140;
  const x0 = M + labelW, x1 = A4.width - M - shareW;
  const lo = symlog(-100), hi = symlog(1000);
  const px = (v: number) => x0 + ((Math.min(hi, Math.max(lo, symlog(v))) - lo) / (hi - lo)) * (x1 - x0);
  const rowH = 17;
  for (const t of SYMLOG_TICKS) {
    page.drawLine({ start: { x: px(t), y: y + 4 }, end: { x: px(t), y: y - rows.length * rowH + 4 }, thickness: t === 0 ? 0.8 : 0.3, color: RULE });
  }
  for (const q of rows) {
    const b = q.box!;
    const label = `${quantityLabel(q.key, q.species)} · ${q.basis}`;
    page.drawText(trim(label, labelW - 6, 8, regular), { x: M, y: y - 4, size: 8, font: regular, color: INK });
    const mid = y - 2;
    page.drawLine({ start: { x: px(b.min), y: mid }, end: { x: px(b.max), y: mid }, thickness: 0.8, color: INK });
    for (const w of [b.min, b.max]) page.drawLine({ start: { x: px(w), y: mid - 4 }, end: { x: px(w), y: mid + 4 }, thickness: 0.8, color: INK });
    const bx = px(b.q1), bw = Math.max(1.5, px(b.q3) - px(b.q1));
    page.drawRectangle({ x: bx, y: mid - 5, width: bw, height: 10, color: rgb(1, 1, 1), borderColor: INK, borderWidth: 0.8 });
    // Hatching so the box reads without colour.
    for (let hx = bx + 3; hx < bx + bw; hx += 3) page.drawLine({ start: { x: hx, y: mid - 5 }, end: { x: Math.min(bx + bw, hx + 3), y: mid + 5 }, thickness: 0.3, color: ACCENT });
    page.drawLine({ start: { x: px(b.median), y: mid - 6 }, end: { x: px(b.median), y: mid + 6 }, thickness: 2, color: INK });
    const sh = q.shares!;
    page.drawText(`within ${pc(sh.within)} · partial ${pc(sh.partial)} · outside ${pc(sh.outside)}`, { x: x1 + 6, y: y - 4, size: 7, font: regular, color: SOFT });
    y -= rowH;
  }
  for (const t of SYMLOG_TICKS) {
    const l = tickLabel(t);
    page.drawText(l, { x: px(t) - regular.widthOfTextAtSize(l, 6.5) / 2, y: y, size: 6.5, font: regular, color: SOFT });
  }
  const more = report.quantities.filter((q) => !q.suppressed && q.box).length - rows.length;
  if (more > 0) page.drawText(`… and ${more} more in the statistics CSV.`, { x: M, y: y - 10, size: 7, font: regular, color: SOFT });
  return y - 18;
}

function histograms(page: PDFPage, report: PracticalReport, top: number, regular: PDFFont, bold: PDFFont): number {
  const items = report.quantities.filter((q) => !q.suppressed && q.histogram).slice(0, 8);
  if (!items.length) return top;
  page.drawText('Histograms of relative deviation (buckets from −10 % to +10 %, outer buckets open)', { x: M, y: top, size: 10, font: bold, color: INK });
  const cols = 4, gap = 10;
  const w = (A4.width - 2 * M - gap * (cols - 1)) / cols, h = 62;
  let yTop = top - 14;
  items.forEach((q, i) => {
    const col = i % cols;
    if (i > 0 && col === 0) yTop -= h + 30;
    const x = M + col * (w + gap);
    const base = yTop - h;
    page.drawText(trim(`${quantityLabel(q.key, q.species)} · ${q.basis}`, w, 7, regular), { x, y: yTop, size: 7, font: regular, color: INK });
    const bins = q.histogram!;
    const max = Math.max(1, ...bins.map((b) => b.count));
    const bw = w / bins.length;
    page.drawLine({ start: { x, y: base }, end: { x: x + w, y: base }, thickness: 0.5, color: INK });
    bins.forEach((b, j) => {
      const bh = (b.count / max) * (h - 18);
      if (b.count > 0) {
        page.drawRectangle({ x: x + j * bw + 0.5, y: base, width: bw - 1, height: bh, color: j === 0 || j === bins.length - 1 ? RULE : ACCENT });
        const t = String(b.count);
        page.drawText(t, { x: x + j * bw + (bw - regular.widthOfTextAtSize(t, 5)) / 2, y: base + bh + 1.5, size: 5, font: regular, color: INK });
      }
    });
    page.drawText('−10 %', { x, y: base - 8, size: 5.5, font: regular, color: SOFT });
    page.drawText('0', { x: x + w / 2 - 1.5, y: base - 8, size: 5.5, font: regular, color: SOFT });
    page.drawText('+10 %', { x: x + w - regular.widthOfTextAtSize('+10 %', 5.5), y: base - 8, size: 5.5, font: regular, color: SOFT });
  });
  return yTop - h - 22;
}

function slipTable(page: PDFPage, report: PracticalReport, top: number, regular: PDFFont, bold: PDFFont) {
  page.drawText('Most frequent slips', { x: M, y: top, size: 10, font: bold, color: INK });
  let y = top - 14;
  if (!report.slips.length) {
    page.drawText('No slips named in this group.', { x: M, y, size: 8, font: regular, color: SOFT });
    return;
  }
  page.drawText('Slip', { x: M, y, size: 8, font: bold, color: SOFT });
  page.drawText('Found', { x: M + 330, y, size: 8, font: bold, color: SOFT });
  page.drawText('Submissions', { x: M + 380, y, size: 8, font: bold, color: SOFT });
  page.drawText('Example', { x: M + 450, y, size: 8, font: bold, color: SOFT });
  y -= 4;
  for (const s of report.slips.slice(0, 10)) {
    if (y < M + 10) break;
    page.drawLine({ start: { x: M, y }, end: { x: A4.width - M, y }, thickness: 0.3, color: RULE });
    y -= 10;
    page.drawText(trim(s.title, 320, 8, regular), { x: M, y, size: 8, font: regular, color: INK });
    page.drawText(String(s.count), { x: M + 330, y, size: 8, font: regular, color: INK });
    page.drawText(String(s.submissions), { x: M + 380, y, size: 8, font: regular, color: INK });
    page.drawText(s.exampleHref, { x: M + 450, y, size: 8, font: regular, color: INK });
    y -= 3;
  }
}

const pc = (v: number) => formatPercent(v * 100, 0);
function trim(t: string, width: number, size: number, font: PDFFont) {
  let s = t;
  while (s.length > 1 && font.widthOfTextAtSize(s, size) > width) s = s.slice(0, -2) + '…';
  return s;
}
