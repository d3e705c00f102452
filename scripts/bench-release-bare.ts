/**
 * The bare PDF part of bench:release: pdf-lib drawing the same strings and vector paths as a
 * feedback document, with no app code, in two ways — pdf-lib's own per-document font subsetting
 * (naive) and fonts embedded once per thread from a shared subset (fast, lib/pdf/fonts.ts, the
 * pdf-lib-level helper the app uses too). Also a worker-thread entry (bench-release-bare-worker.cjs)
 * so the fast way runs on every core, as the app does.
 */
import fs from 'node:fs';
import path from 'node:path';
import { isMainThread, parentPort } from 'node:worker_threads';
import fontkit from '@pdf-lib/fontkit';
import { PDFDocument, type PDFFont } from 'pdf-lib';
import type { FeedbackInput } from '@/lib/pdf/feedback';
import { embedSharedFont } from '@/lib/pdf/fonts';

const fontDir = path.resolve('public/fonts');
let fontBytes: Buffer[] | null = null;

export async function barePdf(input: FeedbackInput, way: 'naive' | 'fast'): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  let f: PDFFont[];
  if (way === 'naive') {
    fontBytes ??= ['DejaVuSans.ttf', 'DejaVuSans-Bold.ttf', 'DejaVuSansMono.ttf'].map((name) => fs.readFileSync(path.join(fontDir, name)));
    f = [
      await doc.embedFont(fontBytes[0], { subset: true }),
      await doc.embedFont(fontBytes[1], { subset: true }),
      await doc.embedFont(fontBytes[2], { subset: true }),
    ];
  } else {
    f = [await embedSharedFont(doc, 'regular'), await embedSharedFont(doc, 'bold'), await embedSharedFont(doc, 'mono')];
  }
  const strings = [
    input.course,
    input.practical,
    input.cohort,
    input.student,
    input.submittedAt,
    ...input.quantities.flatMap((q) => [
      q.label,
      q.reported,
      q.marks,
      ...q.rows.flatMap((r) => [r.basis, r.expected, r.deviation, r.verdict]),
    ]),
    ...input.slips.flatMap((s) => [s.title, s.quantity, s.explanation, s.formula]),
    ...input.comments.map((c) => c.text),
    input.sum,
    input.total,
  ];
  let page = doc.addPage([595.28, 841.89]);
  let y = 800;
  strings.forEach((s, i) => {
    if (y < 60) {
      page = doc.addPage([595.28, 841.89]);
      y = 800;
    }
    page.drawText(s, { x: 42, y, size: 8, font: f[i % 3], maxWidth: 510 });
    y -= 11 * Math.ceil(f[i % 3].widthOfTextAtSize(s, 8) / 510);
  });
  for (const p of input.plots) {
    for (const model of [p.fit, p.residuals]) {
      page = doc.addPage([595.28, 841.89]);
      page.drawSvgPath(model.curve.map(([x, yy], i) => `${i ? 'L' : 'M'}${x} ${yy}`).join(' ') || 'M0 0', {
        x: 42,
        y: 800,
        borderWidth: 0.8,
      });
      for (const m of model.markers)
        page.drawSvgPath(`M${m.x - 3} ${m.y - 3} L${m.x + 3} ${m.y - 3} L${m.x} ${m.y + 3} Z`, { x: 42, y: 800 });
      for (const t of [...model.xAxis.ticks, ...model.yAxis.ticks]) page.drawText(t.label, { x: 42 + t.pos, y: 500, size: 7, font: f[2] });
    }
  }
  return doc.save();
}

if (!isMainThread && parentPort) {
  parentPort.on('message', async (m: { id: number; input: FeedbackInput }) => {
    const pdf = await barePdf(m.input, 'fast');
    parentPort!.postMessage({ id: m.id, size: pdf.byteLength });
  });
  parentPort.postMessage({ ready: true });
}
