/**
 * The feedback PDF, built with pdf-lib. Fonts are DejaVu (shipped in public/fonts), embedded
 * as subsets, because the built-in PDF fonts carry none of ν̃, μ, ω, Å or ⁻¹: one subset prepared
 * once per process and reused (fonts.ts), or pdf-lib's own per-document subset when the text has
 * a character outside it. All wording comes from templates/pdf/feedback.txt.
 */
import fontkit from '@pdf-lib/fontkit';
import { PDFDocument, rgb, type PDFFont, type PDFPage } from 'pdf-lib';
import { fill, templateText } from '@/lib/templates';
import type { PlotModel } from '@/lib/spectrum';
import { drawPlot } from './draw-plot';
import { verdictInfo } from '@/lib/marking/verdict';
import { drawTextIn, embedFonts, wrap } from './fonts';
import { A4, INK, SOFT } from './style';

export type FeedbackInput = {
  course: string;
  practical: string;
  cohort: string;
  student: string;
  submittedAt: string;
  attempt: number;
  daysLate: number;
  latePenalty: number;
  quantities: {
    label: string;
    reported: string;
    rows: { basis: 'consistency' | 'accuracy'; expected: string; deviation: string; verdict: string }[];
    marks: string;
  }[];
  slips: { title: string; quantity: string; explanation: string; formula: string }[];
  plots: { fit: PlotModel; residuals: PlotModel; species: string; description?: string; notices?: string[] }[];
  /** The third comparison, "from your spectrum", when the practical shows it. */
  fromSpectrum?: {
    legend: string;
    verdicts: { word: string; symbol: string; rgb: [number, number, number] }[];
    rows: {
      label: string;
      reported: string;
      fromSpectrum: string;
      deviation: string;
      verdict: { word: string; symbol: string; rgb: [number, number, number] };
    }[];
  } | null;
  rubric: { label: string; marks: string }[];
  comments: { label: string; text: string }[];
  sum: string;
  total: string;
  max: string;
  generatedAt: string;
};

type Fonts = { regular: PDFFont; bold: PDFFont; mono: PDFFont };

function texts(): Record<string, string> {
  const out: Record<string, string> = {};
  for (const line of templateText('pdf/feedback.txt').split('\n')) {
    if (!line.trim() || line.startsWith('#')) continue;
    const i = line.indexOf(':');
    if (i > 0) out[line.slice(0, i).trim()] = line.slice(i + 1).trim();
  }
  return out;
}

/** Every string in the input (the plots' numbers are not text). */
function textsIn(value: unknown, out: string[] = []): string[] {
  if (typeof value === 'string') out.push(value);
  else if (Array.isArray(value)) for (const v of value) textsIn(v, out);
  else if (value && typeof value === 'object') for (const v of Object.values(value)) textsIn(v, out);
  return out;
}

const MARGIN = 42;
const RULE = rgb(0.85, 0.84, 0.78);

class Writer {
  page!: PDFPage;
  y = 0;
  pages: PDFPage[] = [];
  constructor(
    private doc: PDFDocument,
    readonly f: Fonts,
  ) {
    this.newPage();
  }
  newPage() {
    this.page = this.doc.addPage([A4.width, A4.height]);
    this.pages.push(this.page);
    this.y = A4.height - MARGIN;
  }
  need(h: number) {
    if (this.y - h < MARGIN + 20) this.newPage();
  }
  text(t: string, opts: { size?: number; font?: PDFFont; x?: number; color?: ReturnType<typeof rgb>; width?: number; gap?: number } = {}) {
    const size = opts.size ?? 9.5;
    const font = opts.font ?? this.f.regular;
    const lines = wrap(t, font, size, opts.width ?? A4.width - 2 * MARGIN - ((opts.x ?? MARGIN) - MARGIN));
    for (const l of lines) {
      this.need(size * 1.35);
      this.y -= size * 1.35;
      drawTextIn(this.page, l, { x: opts.x ?? MARGIN, y: this.y, size, font, color: opts.color ?? INK });
    }
    this.y -= opts.gap ?? 0;
  }
  /**
   * A heading never ends a page on its own: it moves to the next page unless `keepWith` points of
   * what follows it (its first block) fit under it.
   */
  heading(t: string, keepWith = 40) {
    this.need(10 + 12.5 * 1.35 + 4 + keepWith);
    this.y -= 10;
    this.text(t, { size: 12.5, font: this.f.bold, gap: 4 });
  }
  rule() {
    this.page.drawLine({ start: { x: MARGIN, y: this.y - 3 }, end: { x: A4.width - MARGIN, y: this.y - 3 }, thickness: 0.5, color: RULE });
    this.y -= 6;
  }
}

/** Column layout of the quantity table, points from the left margin. */
const COLS = [
  { key: 'quantity', w: 132 },
  { key: 'reported', w: 96 },
  { key: 'expected', w: 92 },
  { key: 'deviation', w: 70 },
  { key: 'verdict', w: 90 },
  { key: 'marks', w: 31 },
] as const;

export async function buildFeedbackPdf(input: FeedbackInput): Promise<Uint8Array> {
  const T = texts();
  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  // The fonts prepared once per process (fonts.ts), unless some text needs a character they lack.
  const f: Fonts = await embedFonts(doc, ['regular', 'bold', 'mono'], [...textsIn(input), ...Object.values(T)].join(''));
  doc.setTitle(`${fill(T.title, {})}: ${input.practical}`);
  doc.setAuthor('Oscillab');
  doc.setSubject(`${input.course} · ${input.student}`);
  doc.setCreationDate(new Date(input.generatedAt));
  doc.setModificationDate(new Date(input.generatedAt));

  const w = new Writer(doc, f);
  w.text(fill(T.title, {}), { size: 18, font: f.bold });
  w.text(fill(T.subtitle, { practical: input.practical }), { size: 12.5, color: SOFT, gap: 4 });
  w.text(fill(T.course, { course: input.course }));
  w.text(fill(T.cohort, { cohort: input.cohort }));
  w.text(fill(T.student, { student: input.student }));
  w.text(fill(T.submitted, { submittedAt: input.submittedAt, attempt: input.attempt }));
  if (input.daysLate > 0 || input.latePenalty > 0)
    w.text(fill(T.late, { days: input.daysLate, penalty: input.latePenalty }), { font: f.bold });
  w.rule();

  // Quantities.
  w.heading(fill(T.quantitiesHeading, {}), 90);
  w.text(fill(T.quantitiesIntro, {}), { size: 8.5, color: SOFT, gap: 4 });
  const header = [T.colQuantity, T.colReported, T.colExpected, T.colDeviation, T.colVerdict, T.colMarks];
  const drawRow = (
    cells: string[],
    opts: { bold?: boolean; size?: number; colours?: (ReturnType<typeof rgb> | undefined)[]; monoCols?: number[] },
  ) => {
    const size = opts.size ?? 8;
    const wrapped = cells.map((c, i) => wrap(c, opts.bold ? f.bold : opts.monoCols?.includes(i) ? f.mono : f.regular, size, COLS[i].w - 4));
    const lines = Math.max(...wrapped.map((l) => l.length));
    const h = lines * size * 1.3 + 3;
    w.need(h);
    let x = MARGIN;
    wrapped.forEach((ls, i) => {
      ls.forEach((l, j) => {
        const font = opts.bold ? f.bold : opts.monoCols?.includes(i) ? f.mono : f.regular;
        drawTextIn(w.page, l, { x, y: w.y - size * 1.1 - j * size * 1.3, size, font, color: opts.colours?.[i] ?? INK });
      });
      x += COLS[i].w;
    });
    w.y -= h;
  };
  drawRow(header, { bold: true, size: 8 });
  w.rule();
  for (const q of input.quantities) {
    drawRow([q.label, q.reported, '', '', '', q.marks], { monoCols: [1, 5] });
    for (const r of q.rows) {
      const v = verdictInfo(r.verdict);
      drawRow(
        [
          `   ${r.basis === 'consistency' ? T.basisConsistency : T.basisAccuracy}`,
          '',
          r.expected,
          r.deviation,
          `${v.symbol} ${v.word}`,
          '',
        ],
        { size: 7.5, monoCols: [2, 3], colours: [SOFT, undefined, undefined, undefined, rgb(...v.rgb)] },
      );
    }
    w.rule();
  }

  // Named slips.
  // A slip block: title, "In:", a few lines of explanation and the formula.
  const slipHeight = (s: FeedbackInput['slips'][number]) =>
    10 * 1.35 + 8.5 * 1.35 + wrap(s.explanation, f.regular, 9, A4.width - 2 * MARGIN).length * 9 * 1.35 + (s.formula ? 9 * 1.35 + 4 : 0);
  w.heading(fill(T.slipsHeading, {}), input.slips.length ? slipHeight(input.slips[0]) : 20);
  if (input.slips.length === 0) w.text(fill(T.slipsNone, {}));
  for (const s of input.slips) {
    w.need(slipHeight(s));
    w.text(s.title, { font: f.bold, size: 10 });
    w.text(fill(T.slipFor, { quantity: s.quantity }), { size: 8.5, color: SOFT });
    w.text(s.explanation, { size: 9 });
    if (s.formula) w.text(fill(T.formula, { formula: s.formula }), { size: 9, font: f.mono, gap: 4 });
  }

  // Fit and residuals, as vector graphics from the same plot models as the marking screen.
  for (const p of input.plots) {
    const scale = (A4.width - 2 * MARGIN) / p.fit.width;
    w.heading(`${fill(T.fitHeading, {})}${p.species ? ` (${p.species})` : ''}`, 2 * 8.5 * 1.35 + 4 + p.fit.height * scale + 6);
    w.text(fill(T.fitIntro, {}), { size: 8.5, color: SOFT, gap: 4 });
    if (p.description) w.text(p.description, { size: 9, gap: 2 });
    for (const notice of p.notices ?? []) w.text(`• ${notice}`, { size: 9, gap: 2 });
    w.need(p.fit.height * scale + 6);
    drawPlot(w.page, p.fit, { left: MARGIN, top: w.y, scale, font: f.regular, mono: f.mono });
    w.y -= p.fit.height * scale + 6;
    w.need(p.residuals.height * scale + 20);
    w.text(fill(T.residualsCaption, {}), { size: 8.5, font: f.bold });
    drawPlot(w.page, p.residuals, { left: MARGIN, top: w.y, scale, font: f.regular, mono: f.mono });
    w.y -= p.residuals.height * scale + 6;
  }

  // The third comparison: the student's numbers against Oscillab's reading of their own spectrum.
  if (input.fromSpectrum) {
    const fs = input.fromSpectrum;
    w.heading(fill(T.spectrumHeading, {}));
    w.text(fill(T.spectrumIntro, { legend: fs.legend }), { size: 8.5, color: SOFT, gap: 2 });
    w.text(fill(T.spectrumVerdicts, { verdicts: fs.verdicts.map((v) => `${v.symbol} ${v.word}`).join(' · ') }), {
      size: 8.5,
      color: SOFT,
      gap: 4,
    });
    if (fs.rows.length === 0) w.text(fill(T.spectrumNone, {}));
    else {
      drawRow([T.colQuantity, T.colReported, T.colFromSpectrum, T.colDeviation, T.colVerdict, ''], { bold: true, size: 8 });
      w.rule();
      for (const r of fs.rows) {
        drawRow([r.label, r.reported, r.fromSpectrum, r.deviation, `${r.verdict.symbol} ${r.verdict.word}`, ''], {
          size: 7.5,
          monoCols: [1, 2, 3],
          colours: [undefined, undefined, undefined, undefined, rgb(...r.verdict.rgb)],
        });
      }
      w.rule();
    }
  }

  if (input.rubric.length) {
    w.heading(fill(T.rubricHeading, {}), 14);
    for (const r of input.rubric) drawRow([r.label, '', '', '', '', r.marks], { monoCols: [5] });
  }

  w.heading(
    fill(T.commentsHeading, {}),
    input.comments.length
      ? 9 * 1.35 + wrap(input.comments[0].text, f.regular, 9.5, A4.width - 2 * MARGIN).slice(0, 3).length * 9.5 * 1.35
      : 14,
  );
  if (input.comments.length === 0) w.text(fill(T.commentsNone, {}));
  for (const c of input.comments) {
    if (c.label) w.text(c.label, { font: f.bold, size: 9 });
    w.text(c.text, { size: 9.5, gap: 3 });
  }

  // The three lines of the total stay with their heading.
  w.heading(fill(T.totalHeading, {}), 3 * 12 * 1.35 + 4);
  w.text(fill(T.sumLine, { sum: input.sum, max: input.max }), { font: f.mono });
  if (input.latePenalty > 0) w.text(fill(T.penaltyLine, { penalty: input.latePenalty }), { font: f.mono });
  w.text(fill(T.totalLine, { total: input.total, max: input.max }), { font: f.bold, size: 12 });

  const pages = w.pages.length;
  w.pages.forEach((page, i) => {
    const text = fill(T.footer, { course: input.course, generatedAt: input.generatedAt.slice(0, 10), page: i + 1, pages });
    drawTextIn(page, text, { x: MARGIN, y: MARGIN - 16, size: 7, font: f.regular, color: SOFT });
  });
  return doc.save();
}
