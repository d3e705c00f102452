/**
 * The feedback PDF: its text (extracted with poppler's pdftotext) carries the student's
 * values as typed, units with Greek letters and superscripts, and the named slip; its first
 * page rendered with pdftoppm is not blank.
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildWorld } from '@/tests/helpers/world';
import { buildFeedbackPdf } from '@/lib/pdf/feedback';
import { feedbackInputFromView } from '@/lib/marking/feedback-input';
import { loadMarkingView } from '@/lib/marking/view';
import { acceptProposal, saveMarks } from '@/lib/marking/marks';
import { createCheckedSubmission, createFixturePractical } from '@/lib/marking/test-fixtures';
import { SLIPS } from '@/lib/grading';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-pdf-'));
let pdfFile = '';
let submissionId = 0;

/** Share of pixels darker than near-white in a binary PGM (P5) as written by pdftoppm -gray. */
export function inkShare(pgm: Buffer): number {
  const header = pgm.subarray(0, 64).toString('latin1');
  const m = /^P5\s+(?:#[^\n]*\s+)*(\d+)\s+(\d+)\s+(\d+)\s/.exec(header);
  if (!m) throw new Error('not a binary PGM');
  const [width, height] = [Number(m[1]), Number(m[2])];
  const pixels = pgm.subarray(m[0].length, m[0].length + width * height);
  let dark = 0;
  for (const p of pixels) if (p < 200) dark++;
  return dark / (width * height);
}

beforeAll(async () => {
  const w = await buildWorld();
  const practical = await createFixturePractical(w.course.id, [w.cohort.id]);
  const sub = await createCheckedSubmission({
    practicalId: practical.id,
    cohortId: w.cohort.id,
    studentId: w.people.student.id,
    slip: true,
    latePenalty: 10,
  });
  const r = await acceptProposal(w.people.ta.id, sub.id, sub.version);
  await saveMarks(w.people.ta.id, sub.id, {
    version: r.version,
    items: [{ itemKey: 'rubric:discussion', awarded: 1, comment: 'Say which error dominates.' }],
    markerComment: 'Clear report; check μ.',
  });
  submissionId = sub.id;
  const pdf = await buildFeedbackPdf(feedbackInputFromView(await loadMarkingView(sub.id)));
  pdfFile = path.join(dir, 'feedback.pdf');
  fs.writeFileSync(pdfFile, pdf);
  if (process.env.KEEP_PDF) fs.copyFileSync(pdfFile, process.env.KEEP_PDF);
});

describe('feedback PDF', () => {
  it('text contains the typed values, typeset units, Greek letters and the named slip', () => {
    const text = execFileSync('pdftotext', ['-enc', 'UTF-8', pdfFile, '-']).toString('utf8');
    expect(text).toContain('477.1'); // the force constant as typed (fixture)
    expect(text).toContain('0.9722'); // the reduced mass as typed
    expect(text).toContain(SLIPS['mass-numbers-used'].title);
    expect(text).toContain('cm⁻¹');
    expect(text).toContain('N m⁻¹');
    expect(text).toMatch(/μ/);
    expect(text).toMatch(/ν/);
    expect(text).toContain('Late penalty: 10 %');
    expect(text).toContain('Clear report; check μ.');
    expect(text).toContain('outside tolerance');
  });

  it('no page ends on a heading whose content is on the next page, however long the table before it', async () => {
    // Headings as in templates/pdf/feedback.txt; the quantity table grows one row at a time, so
    // every heading after it lands at every height of the page somewhere in the sweep.
    const headings = fs
      .readFileSync(path.resolve('templates/pdf/feedback.txt'), 'utf8')
      .split('\n')
      .filter((l) => /^(quantitiesHeading|slipsHeading|fitHeading|rubricHeading|commentsHeading|totalHeading):/.test(l))
      .map((l) => l.slice(l.indexOf(':') + 1).trim());
    const base = feedbackInputFromView(await loadMarkingView(submissionId));
    const orphans: string[] = [];
    for (let n = 14; n <= 40; n += 2) {
      const input = {
        ...base,
        quantities: Array.from({ length: n }, (_, i) => ({ ...base.quantities[i % base.quantities.length], label: `Quantity ${i + 1}` })),
      };
      const file = path.join(dir, `sweep-${n}.pdf`);
      fs.writeFileSync(file, await buildFeedbackPdf(input));
      const pages = Number(/Pages:\s+(\d+)/.exec(execFileSync('pdfinfo', [file]).toString('utf8'))![1]);
      for (let p = 1; p < pages; p++) {
        const lines = execFileSync('pdftotext', ['-layout', '-f', String(p), '-l', String(p), '-enc', 'UTF-8', file, '-'])
          .toString('utf8')
          .split('\n')
          .map((l) => l.trim())
          .filter((l) => l && !l.startsWith('Oscillab feedback ·'));
        const last = lines.at(-1) ?? '';
        if (headings.some((h) => last.startsWith(h))) orphans.push(`${n} quantities, page ${p} ends on "${last}"`);
      }
    }
    expect(orphans).toEqual([]);
  });

  it('renders (pdftoppm) to a page that is not blank', () => {
    const out = path.join(dir, 'page');
    execFileSync('pdftoppm', ['-r', '50', '-gray', '-f', '1', '-l', '1', pdfFile, out]);
    const file = fs.readdirSync(dir).find((f) => f.startsWith('page') && f.endsWith('.pgm'))!;
    const share = inkShare(fs.readFileSync(path.join(dir, file)));
    expect(share).toBeGreaterThan(0.01);
    expect(share).toBeLessThan(0.6);
  });
});
