/**
 * The PDF summary of a cohort's statistics, built with pdf-lib. The charts are vector drawings
 * (lines and rectangles), not images; DejaVu fonts (public/fonts) are embedded as subsets because
 * the standard PDF fonts lack ν̃, μ, ₑ and −. Verdict shares are printed as words and numbers,
 * and the box-plot boxes are hatched, so a grey-scale print reads the same.
 *
 * Page 1 carries every quantity (both questions, consistency and accuracy) and every slip listed
 * in the report, with quantity names; labels wrap rather than being cut. The histograms follow on
 * the next page. Figures are median and middle half (see the dashboard's QuantityTable).
 */
import fontkit from '@pdf-lib/fontkit';
import { PDFDocument, rgb, type PDFFont, type PDFPage } from 'pdf-lib';
import { drawTextIn, embedFonts, textWidth, wrap as wrapText } from '@/lib/pdf/fonts';
import { A4, INK, SOFT } from '@/lib/pdf/style';
import type { PracticalReport } from './report';
import { formatPercent, quantityLabel, symlog, SYMLOG_TICKS, tickLabel } from './scale';

const M = 40;
const RULE = rgb(0.75, 0.73, 0.66);
const ACCENT = rgb(0.12, 0.37, 0.45);

/** Words into lines no wider than `width` (a word longer than the line is split by characters). */
function wrap(t: string, width: number, size: number, font: PDFFont): string[] {
  return wrapText(t, font, size, width, { breakWords: true });
}

class Pages {
  page: PDFPage;
  y: number;
  readonly all: PDFPage[] = [];
  constructor(
    private doc: PDFDocument,
    readonly regular: PDFFont,
    readonly bold: PDFFont,
  ) {
    this.page = this.add();
    this.y = A4.height - M;
  }
  private add() {
    const p = this.doc.addPage([A4.width, A4.height]);
    this.all.push(p);
    return p;
  }
  newPage() {
    this.page = this.add();
    this.y = A4.height - M;
  }
  /** Room for h points, or a new page. */
  need(h: number) {
    if (this.y - h < M + 14) this.newPage();
  }
  text(t: string, x: number, y: number, size = 8, font: PDFFont = this.regular, color = INK) {
    drawTextIn(this.page, t, { x, y, size, font, color });
  }
}

export async function summaryPdf(report: PracticalReport, generatedAt = new Date()): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  // Everything the summary prints beyond the report's own strings: quantity names (with ₑ …) and the axis's ticks.
  const printed = [
    JSON.stringify(report),
    ...report.quantities.map((q) => quantityLabel(q.key, q.species)),
    ...SYMLOG_TICKS.map(tickLabel),
  ].join('');
  const { regular, bold } = await embedFonts(doc, ['regular', 'bold'], printed);
  doc.setTitle(`Cohort statistics: ${report.practical.title}, ${report.scope.label}`);
  doc.setCreator('Oscillab');
  const w = new Pages(doc, regular, bold);

  w.text('Cohort statistics', M, w.y - 14, 16, bold);
  w.y -= 32;
  for (const line of wrap(`${report.practical.title} — ${report.scope.label}`, A4.width - 2 * M, 11, bold)) {
    w.text(line, M, w.y, 11, bold, SOFT);
    w.y -= 14;
  }
  w.text(`Generated ${generatedAt.toISOString().slice(0, 16).replace('T', ' ')} UTC by Oscillab`, M, w.y, 8, regular, SOFT);
  w.y -= 18;
  const c = report.counts;
  w.text(
    `Students ${c.students}   Submitted ${c.submitted}   On time ${c.onTime}   Late ${c.late}   Marked ${c.marked}   Released ${c.released}`,
    M,
    w.y,
    10,
    bold,
  );
  w.y -= 20;

  if (report.suppressed) {
    w.text(`Fewer than ${report.minGroup} students in this group: counts only, no distributions or means.`, M, w.y, 9, regular, SOFT);
    w.y -= 20;
  } else {
    for (const basis of ['consistency', 'accuracy'] as const) boxPlots(w, report, basis);
  }
  slipTable(w, report);
  if (!report.suppressed) histograms(w, report);

  const total = w.all.length;
  w.all.forEach((p, i) => {
    drawTextIn(p, `Oscillab · ${report.practical.title} · ${report.scope.label} · page ${i + 1} of ${total}`, {
      x: M,
      y: M - 16,
      size: 7,
      font: regular,
      color: SOFT,
    });
  });
  return doc.save();
}

function boxPlots(w: Pages, report: PracticalReport, basis: 'consistency' | 'accuracy') {
  const rows = report.quantities.filter((q) => q.basis === basis && !q.suppressed && q.box);
  if (!rows.length) return;
  const labelW = 150;
  const textW = 150;
  const x0 = M + labelW + 6;
  const x1 = A4.width - M - textW;
  const lo = symlog(-100);
  const hi = symlog(1000);
  const px = (v: number) => x0 + ((Math.min(hi, Math.max(lo, symlog(v))) - lo) / (hi - lo)) * (x1 - x0);
  const title =
    basis === 'consistency'
      ? 'Consistency: is each number right from the student’s own data?'
      : 'Accuracy: is the measurement close to the accepted value?';
  w.need(60);
  w.text(title, M, w.y, 10, w.bold);
  w.y -= 12;
  w.text(
    'Relative deviation per quantity. Box: middle half (first to third quartile), bar: median, whiskers: smallest to largest; log-scaled axis.',
    M,
    w.y,
    7,
    w.regular,
    SOFT,
  );
  w.y -= 8;
  const drawAxis = () => {
    for (const t of SYMLOG_TICKS) {
      const l = tickLabel(t);
      w.text(l, px(t) - textWidth(l, w.regular, 6.5) / 2, w.y - 8, 6.5, w.regular, SOFT);
    }
    w.y -= 12;
  };
  drawAxis();
  for (const q of rows) {
    const label = wrap(quantityLabel(q.key, q.species), labelW, 7.5, w.regular).slice(0, 3);
    const rowH = Math.max(16, label.length * 9 + 4);
    if (w.y - rowH < M + 14) {
      w.newPage();
      drawAxis();
    }
    const top = w.y;
    const mid = top - rowH / 2;
    label.forEach((l, i) => w.text(l, M, top - 9 - i * 9, 7.5));
    for (const t of SYMLOG_TICKS)
      w.page.drawLine({ start: { x: px(t), y: top }, end: { x: px(t), y: top - rowH }, thickness: t === 0 ? 0.8 : 0.3, color: RULE });
    const b = q.box!;
    w.page.drawLine({ start: { x: px(b.min), y: mid }, end: { x: px(b.max), y: mid }, thickness: 0.8, color: INK });
    for (const v of [b.min, b.max])
      w.page.drawLine({ start: { x: px(v), y: mid - 4 }, end: { x: px(v), y: mid + 4 }, thickness: 0.8, color: INK });
    const bx = px(b.q1);
    const bw = Math.max(1.5, px(b.q3) - px(b.q1));
    w.page.drawRectangle({ x: bx, y: mid - 5, width: bw, height: 10, color: rgb(1, 1, 1), borderColor: INK, borderWidth: 0.8 });
    // Hatching so the box reads without colour.
    for (let hx = bx + 3; hx < bx + bw; hx += 3)
      w.page.drawLine({ start: { x: hx, y: mid - 5 }, end: { x: Math.min(bx + bw, hx + 3), y: mid + 5 }, thickness: 0.3, color: ACCENT });
    w.page.drawLine({ start: { x: px(b.median), y: mid - 6 }, end: { x: px(b.median), y: mid + 6 }, thickness: 2, color: INK });
    const sh = q.shares!;
    w.text(`median ${formatPercent(b.median)}`, x1 + 8, top - 8, 7);
    w.text(`within ${pc(sh.within)} · partial ${pc(sh.partial)} · outside ${pc(sh.outside)}`, x1 + 8, top - 16, 6.5, w.regular, SOFT);
    w.y -= rowH;
    w.page.drawLine({ start: { x: M, y: w.y }, end: { x: A4.width - M, y: w.y }, thickness: 0.2, color: RULE });
  }
  w.y -= 14;
}

function slipTable(w: Pages, report: PracticalReport) {
  w.need(40);
  w.text('Most frequent slips', M, w.y, 10, w.bold);
  w.y -= 14;
  if (!report.slips.length) {
    w.text('No slips named in this group.', M, w.y, 8, w.regular, SOFT);
    w.y -= 14;
    return;
  }
  const cols = [
    { title: 'Slip', x: M, w: 160 },
    { title: 'Found in', x: M + 166, w: 170 },
    { title: 'Times', x: M + 342, w: 30 },
    { title: 'Subm.', x: M + 376, w: 30 },
    { title: 'Example', x: M + 412, w: A4.width - M - (M + 412) },
  ];
  const header = () => {
    for (const col of cols) w.text(col.title, col.x, w.y, 7.5, w.bold, SOFT);
    w.y -= 4;
  };
  header();
  for (const s of report.slips) {
    const cells = [s.title, s.quantities.join(', '), String(s.count), String(s.submissions), s.example].map((t, i) =>
      wrap(t, cols[i].w, 7.5, w.regular),
    );
    const h = Math.max(...cells.map((c) => c.length)) * 9 + 5;
    if (w.y - h < M + 14) {
      w.newPage();
      header();
    }
    w.page.drawLine({ start: { x: M, y: w.y }, end: { x: A4.width - M, y: w.y }, thickness: 0.3, color: RULE });
    cells.forEach((lines, i) => lines.forEach((l, j) => w.text(l, cols[i].x, w.y - 9 - j * 9, 7.5)));
    w.y -= h;
  }
  w.y -= 10;
}

function histograms(w: Pages, report: PracticalReport) {
  const items = report.quantities.filter((q) => !q.suppressed && q.histogram);
  if (!items.length) return;
  w.newPage();
  w.text('Histograms of relative deviation (buckets from −10 % to +10 %, outer buckets open)', M, w.y, 10, w.bold);
  w.y -= 16;
  const cols = 4;
  const gap = 10;
  const cw = (A4.width - 2 * M - gap * (cols - 1)) / cols;
  const h = 62;
  items.forEach((q, i) => {
    const col = i % cols;
    const label = wrap(`${quantityLabel(q.key, q.species)} · ${q.basis}`, cw, 6.5, w.regular).slice(0, 2);
    if (col === 0) w.need(h + 40);
    const yTop = w.y;
    const x = M + col * (cw + gap);
    label.forEach((l, j) => w.text(l, x, yTop - j * 8, 6.5));
    const base = yTop - 14 - h;
    const bins = q.histogram!;
    const max = Math.max(1, ...bins.map((b) => b.count));
    const bw = cw / bins.length;
    w.page.drawLine({ start: { x, y: base }, end: { x: x + cw, y: base }, thickness: 0.5, color: INK });
    bins.forEach((b, j) => {
      const bh = (b.count / max) * (h - 18);
      if (b.count > 0) {
        w.page.drawRectangle({
          x: x + j * bw + 0.5,
          y: base,
          width: bw - 1,
          height: bh,
          color: j === 0 || j === bins.length - 1 ? RULE : ACCENT,
        });
        const t = String(b.count);
        w.text(t, x + j * bw + (bw - textWidth(t, w.regular, 5)) / 2, base + bh + 1.5, 5);
      }
    });
    w.text('−10 %', x, base - 8, 5.5, w.regular, SOFT);
    w.text('0', x + cw / 2 - 1.5, base - 8, 5.5, w.regular, SOFT);
    w.text('+10 %', x + cw - textWidth('+10 %', w.regular, 5.5), base - 8, 5.5, w.regular, SOFT);
    if (col === cols - 1 || i === items.length - 1) w.y = base - 22;
  });
}

const pc = (v: number) => formatPercent(v * 100, 0);
