/**
 * Files without a row (issue 8, item 6): a process killed between writing a file and committing
 * its row leaves the file behind. The sweep removes exactly those, once past the grace period,
 * and nothing a row refers to, nothing still being written, nothing it did not name itself.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { models } from '@/models';
import { feedbackDir, uploadDir } from '@/lib/storage';
import { sweepGraceMs, sweepOrphanFiles } from '@/lib/storage-sweep';
import { buildWorld, type World } from '@/tests/helpers/world';
import { freshSubmission, PDF, uploadAs } from '@/tests/helpers/fixture-world';
import { apiRequest } from '@/tests/helpers/session';
import { buildPractical, draftFor } from '@/tests/fixtures/submissions/practical';
import { PUT as saveDraft } from '@/app/api/submissions/draft/route';

const HOUR = 60 * 60_000;
const hex = () => crypto.randomBytes(16).toString('hex');

/** A file with its modification time set `ageMs` in the past. */
function place(dir: string, name: string, ageMs: number): string {
  const file = path.join(dir, name);
  fs.writeFileSync(file, 'left behind');
  const t = new Date(Date.now() - ageMs);
  fs.utimesSync(file, t, t);
  return file;
}

let world: World;
beforeAll(async () => {
  world = await buildWorld();
});

describe('storage sweep', () => {
  it('removes old files no row refers to, and keeps referenced, recent, partial-in-progress and foreign files', async () => {
    const released = await freshSubmission(world, 'released');
    const doc = (await models().FeedbackDocument.findOne({ where: { submissionId: released.id } }))!;
    const practicalId = (await buildPractical(world)).practical.id;
    const saved = await saveDraft(
      await apiRequest('/api/submissions/draft', {
        as: world.people.student.id,
        method: 'PUT',
        body: { practicalId, draft: draftFor('H35Cl', {}) },
      }),
      {},
    );
    const draftId = (await saved.json()).id;
    expect((await uploadAs(world.people.student.id, draftId, 'report', 'report.pdf', PDF)).status).toBe(201);
    const referencedUploads = (await models().Upload.findAll()).map((u) => u.storedName);
    expect(referencedUploads.length).toBeGreaterThanOrEqual(1);

    // Make every referenced file old too: age alone must not remove them.
    const old = new Date(Date.now() - 10 * HOUR);
    for (const name of referencedUploads) fs.utimesSync(path.join(uploadDir(), name), old, old);
    fs.utimesSync(path.join(feedbackDir(), doc.storedName), old, old);

    const orphanPdf = place(feedbackDir(), `${hex()}.pdf`, 2 * HOUR);
    const orphanUpload = place(uploadDir(), `${hex()}.jdx`, 2 * HOUR);
    const stalePart = place(uploadDir(), `${hex()}.part`, 2 * HOUR);
    const recentOrphan = place(feedbackDir(), `${hex()}.pdf`, 5 * 60_000);
    const livePart = place(uploadDir(), `${hex()}.part`, 10_000);
    const foreign = place(uploadDir(), 'README-from-the-admin.txt', 100 * HOUR);

    const report = await sweepOrphanFiles();
    expect(report.removed.sort()).toEqual([orphanPdf, orphanUpload, stalePart].map((f) => path.relative(uploadDir(), f)).sort());
    for (const gone of [orphanPdf, orphanUpload, stalePart]) expect(fs.existsSync(gone)).toBe(false);
    for (const kept of [
      recentOrphan,
      livePart,
      foreign,
      path.join(feedbackDir(), doc.storedName),
      ...referencedUploads.map((n) => path.join(uploadDir(), n)),
    ]) {
      expect(fs.existsSync(kept), kept).toBe(true);
    }
    // The feedback PDF a row refers to still downloads as it did.
    expect(fs.readFileSync(path.join(feedbackDir(), doc.storedName)).subarray(0, 5).toString()).toBe('%PDF-');

    // Past the grace period the recent orphan goes as well; a second sweep then finds nothing.
    const later = await sweepOrphanFiles({ now: new Date(Date.now() + sweepGraceMs()) });
    expect(later.removed).toEqual(expect.arrayContaining([path.relative(uploadDir(), recentOrphan), path.relative(uploadDir(), livePart)]));
    expect(fs.existsSync(foreign)).toBe(true);
    expect((await sweepOrphanFiles({ now: new Date(Date.now() + sweepGraceMs()) })).removed).toEqual([]);
  });

  it('the grace period outlasts the longest upload allowed (common practice: never race a writer)', () => {
    const saved = process.env.UPLOAD_TOTAL_MS;
    process.env.UPLOAD_TOTAL_MS = String(3 * HOUR);
    try {
      expect(sweepGraceMs()).toBeGreaterThanOrEqual(2 * 3 * HOUR);
    } finally {
      if (saved === undefined) delete process.env.UPLOAD_TOTAL_MS;
      else process.env.UPLOAD_TOTAL_MS = saved;
    }
    expect(sweepGraceMs()).toBeGreaterThanOrEqual(HOUR);
  });
});
