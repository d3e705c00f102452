/**
 * Release through the outbox: with the mail catcher down everything stays queued (nothing
 * lost, status already released); once it is up, each student receives exactly one copy.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiRequest, params } from '@/tests/helpers/session';
import { buildWorld, type World } from '@/tests/helpers/world';
import { caughtMail, mailTo } from '@/tests/helpers/maildev';
import { models } from '@/models';
import { deliverOutbox } from '@/lib/mail/outbox';
import { POST as releasePOST } from '@/app/api/release/route';
import { POST as resendPOST } from '@/app/api/marking/[submissionId]/resend/route';
import { acceptProposal, saveMarks } from '@/lib/marking/marks';
import { createCheckedSubmission, createFixturePractical } from '@/lib/marking/test-fixtures';
import { releaseMany } from '@/lib/marking/release';

const SMTP = 1425;
const WEB = 1480;
const CLOSED = 1429; // nothing listens here
let catcher: ChildProcess | null = null;
let w: World;
const students: { id: number; email: string }[] = [];
const ids: number[] = [];

async function waitFor(url: string, ms = 15000) {
  const end = Date.now() + ms;
  for (;;) {
    try {
      if ((await fetch(url)).ok) return;
    } catch {}
    if (Date.now() > end) throw new Error(`catcher did not start: ${url}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/**
 * A student of the world's cohort with a checked submission to `practicalId`, marked by the TA
 * (the proposal accepted and the discussion awarded `awarded`) unless `awarded` is null.
 */
async function studentWithSubmission(
  practicalId: number,
  tag: string,
  i: number,
  { slip = false, awarded = 1 as number | null } = {},
): Promise<{ id: number; name: string; email: string; submissionId: number }> {
  const { User, CourseMembership } = models();
  const name = `${tag[0].toUpperCase()}${tag.slice(1)} Student ${i}`;
  const s = await User.create({
    email: `${tag}.${i}@test.example`,
    name,
    passwordHash: null,
    isAdmin: false,
    studentNumber: `${tag[0].toUpperCase()}${i}`,
  });
  await CourseMembership.create({ userId: s.id, courseId: w.course.id, role: 'student', cohortId: w.cohort.id });
  const sub = await createCheckedSubmission({ practicalId, cohortId: w.cohort.id, studentId: s.id, slip });
  if (awarded !== null) {
    const r = await acceptProposal(w.people.ta.id, sub.id, sub.version);
    await saveMarks(w.people.ta.id, sub.id, { version: r.version, items: [{ itemKey: 'rubric:discussion', awarded }] });
  }
  return { id: s.id, name, email: s.email, submissionId: sub.id };
}

beforeAll(async () => {
  process.env.MAILDEV_API = `http://127.0.0.1:${WEB}`;
  w = await buildWorld();
  const practical = await createFixturePractical(w.course.id, [w.cohort.id]);
  for (let i = 0; i < 4; i++) {
    const s = await studentWithSubmission(practical.id, 'release', i, { slip: i % 2 === 0 });
    students.push({ id: s.id, email: s.email });
    ids.push(s.submissionId);
  }
});

afterAll(() => {
  catcher?.kill('SIGTERM');
});

describe('release', () => {
  it('a TA of another cohort cannot release (403) and nothing is written', async () => {
    const res = await releasePOST(await apiRequest('/api/release', { as: w.people.otherTa.id, body: { submissionIds: ids } }), {});
    expect(res.status).toBe(403);
    expect(await models().EmailOutbox.count()).toBe(0);
  });

  it('with SMTP down, releases and queues everything; later delivers each exactly once', { timeout: 120_000 }, async () => {
    const t0 = Date.now();
    const lap = (what: string) => console.log('[release.test]', what, Date.now() - t0, 'ms');
    process.env.SMTP_URL = `smtp://127.0.0.1:${CLOSED}`;
    const res = await releasePOST(await apiRequest('/api/release', { as: w.people.ta.id, body: { submissionIds: ids } }), {});
    expect(res.status).toBe(200);
    expect((await res.json()).released).toBe(4);
    lap('released');
    const { Submission, EmailOutbox, FeedbackDocument } = models();
    // Let the release's own delivery attempt finish (it fails: nothing listens).
    await new Promise((r) => setTimeout(r, 1500));
    const first = await deliverOutbox();
    expect(first.sent).toBe(0);
    const rows = await EmailOutbox.findAll({ where: { submissionId: ids } });
    expect(rows).toHaveLength(4);
    for (const r of rows) {
      expect(r.status).toBe('queued');
      expect(r.feedbackDocumentId).not.toBeNull();
      expect(r.dedupeKey).toBe(`release:${r.submissionId}:1`);
    }
    expect(rows.some((r) => r.attempts >= 1 && r.lastError)).toBe(true);
    expect(await Submission.count({ where: { id: ids, status: 'released' } })).toBe(4);
    expect(await FeedbackDocument.count({ where: { submissionId: ids } })).toBe(4);

    // Releasing again is refused per submission and queues nothing new.
    const again = await (
      await releasePOST(await apiRequest('/api/release', { as: w.people.ta.id, body: { submissionIds: ids } }), {})
    ).json();
    expect(again.released).toBe(0);
    expect(await EmailOutbox.count({ where: { submissionId: ids } })).toBe(4);

    catcher = spawn(process.execPath, [path.resolve('scripts/maildev.mjs'), String(SMTP), String(WEB)], { stdio: 'ignore' });
    await waitFor(`http://127.0.0.1:${WEB}/api/email`);
    lap('catcher up');
    await fetch(`http://127.0.0.1:${WEB}/api/email/all`, { method: 'DELETE' });
    process.env.SMTP_URL = `smtp://127.0.0.1:${SMTP}`;
    const later = () => new Date(Date.now() + 60 * 60_000); // past any back-off
    const [a, b] = await Promise.all([deliverOutbox({ now: later }), deliverOutbox({ now: later })]);
    lap('delivered');
    expect(a.sent + b.sent).toBe(4);
    expect((await deliverOutbox({ now: later })).sent).toBe(0);
    for (const s of students) {
      const mail = await mailTo(s.email);
      expect(mail).toHaveLength(1);
      expect(mail[0].attachments?.[0]?.contentType).toBe('application/pdf');
    }
    expect((await caughtMail()).length).toBe(4);
    expect(await EmailOutbox.count({ where: { submissionId: ids, status: 'sent' } })).toBe(4);
  });

  it('staff can resend a sent message; it arrives once more', async () => {
    const row = await models().EmailOutbox.findOne({ where: { submissionId: ids[0] } });
    const res = await resendPOST(
      await apiRequest(`/api/marking/${ids[0]}/resend`, { as: w.people.ta.id, body: { outboxId: row!.id } }),
      params({ submissionId: String(ids[0]) }),
    );
    expect(res.status).toBe(200);
    await new Promise((r) => setTimeout(r, 300));
    await deliverOutbox();
    expect(await mailTo(students[0].email)).toHaveLength(2);
    const wrong = await resendPOST(
      await apiRequest(`/api/marking/${ids[1]}/resend`, { as: w.people.ta.id, body: { outboxId: row!.id } }),
      params({ submissionId: String(ids[1]) }),
    );
    expect(wrong.status).toBe(404);
  });

  it(
    'a batch reports progress line by line (NDJSON) while its PDFs render on worker threads; every PDF is whole and names its student',
    { timeout: 120_000 },
    async () => {
      const { FeedbackDocument } = models();
      const practical = await createFixturePractical(w.course.id, [w.cohort.id]);
      const batch: number[] = [];
      const names: string[] = [];
      for (let i = 0; i < 5; i++) {
        const s = await studentWithSubmission(practical.id, 'progress', i, { slip: i === 0, awarded: 2 });
        batch.push(s.submissionId);
        names.push(s.name);
      }
      const res = await releasePOST(
        await apiRequest('/api/release', {
          as: w.people.ta.id,
          body: { submissionIds: batch },
          headers: { accept: 'application/x-ndjson' },
        }),
        {},
      );
      expect(res.status).toBe(200);
      expect(res.headers.get('content-type')).toContain('application/x-ndjson');
      const lines = (await res.text())
        .trim()
        .split('\n')
        .map((l) => JSON.parse(l));
      expect(lines.slice(0, 5).map((l) => l.done)).toEqual([1, 2, 3, 4, 5]);
      expect(lines.slice(0, 5).every((l) => l.total === 5 && l.ok)).toBe(true);
      expect(lines[5].released).toBe(5);
      expect(lines[5].results.map((r: { submissionId: number }) => r.submissionId)).toEqual(batch); // in the order asked
      const { PDFDocument } = await import('pdf-lib');
      const { execFileSync } = await import('node:child_process');
      const { feedbackPath } = await import('@/lib/storage');
      for (const [i, id] of batch.entries()) {
        const doc = (await FeedbackDocument.findOne({ where: { submissionId: id } }))!;
        const file = feedbackPath(doc.storedName);
        expect((await PDFDocument.load(new Uint8Array((await import('node:fs')).readFileSync(file)))).getPageCount()).toBeGreaterThan(0);
        expect(execFileSync('pdftotext', ['-enc', 'UTF-8', file, '-']).toString('utf8')).toContain(names[i]);
      }
      const { stopPdfWorkers } = await import('@/lib/pdf/pool');
      await stopPdfWorkers();
      // Let the delivery the release started finish before the database goes away.
      for (let t = 0; t < 50 && (await models().EmailOutbox.count({ where: { submissionId: batch, status: 'sending' } })) > 0; t++)
        await new Promise((r) => setTimeout(r, 200));
    },
  );

  it('a batch commits in groups and says so after each (where the route starts sending); a submission not marked, or gone, is refused without stopping the rest', async () => {
    const { EmailOutbox } = models();
    const practical = await createFixturePractical(w.course.id, [w.cohort.id]);
    const batch: number[] = [];
    // The fourth is checked but not marked.
    for (let i = 0; i < 7; i++)
      batch.push((await studentWithSubmission(practical.id, 'group', i, { awarded: i === 3 ? null : 1 })).submissionId);
    const gone = Math.max(...batch) + 1000;
    // What each group's commit has queued by the time it is announced.
    const queuedAtEachCommit: Promise<number>[] = [];
    const outcomes = await releaseMany(w.people.ta.id, [...batch, gone], {
      afterCommit: () => queuedAtEachCommit.push(EmailOutbox.count({ where: { submissionId: batch } })),
    });
    expect(outcomes.map((o) => o.submissionId)).toEqual([...batch, gone]);
    expect(outcomes.map((o) => o.ok)).toEqual([true, true, true, false, true, true, true, false]);
    expect(outcomes[3].message).toMatch(/Only marked submissions can be released/);
    expect(outcomes[7].message).toBe('Not found.');
    const counts = await Promise.all(queuedAtEachCommit);
    expect(counts.length).toBeGreaterThanOrEqual(1);
    expect(counts).toEqual([...counts].sort((a, b) => a - b));
    expect(counts[counts.length - 1]).toBe(6);
    const rows = await EmailOutbox.findAll({ where: { submissionId: batch } });
    expect(rows.map((r) => r.dedupeKey).sort()).toEqual(
      batch
        .filter((_, i) => i !== 3)
        .map((id) => `release:${id}:1`)
        .sort(),
    );
    const { stopPdfWorkers } = await import('@/lib/pdf/pool');
    await stopPdfWorkers();
  });
});
