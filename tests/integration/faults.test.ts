/**
 * Faults (issue 8, item 6): SMTP down during a release, the app process killed mid-release and
 * mid-delivery, the database locked by another connection, and the disk failing under an upload.
 * Each recovers without losing (or duplicating) a submission, a mark or an e-mail.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { Op, QueryTypes } from 'sequelize';
import { apiRequest, params } from '@/tests/helpers/session';
import { buildWorld, type World } from '@/tests/helpers/world';
import { correctValues, JCAMP, uploadAs } from '@/tests/helpers/fixture-world';
import { buildPractical, draftFor } from '@/tests/fixtures/submissions/practical';
import { caughtMail, mailTo } from '@/tests/helpers/maildev';
import { releaseLanes } from '@/lib/marking/release';
import {
  clearMail,
  closedPort,
  holdWriteLock,
  sqliteFile,
  stallingRelay,
  startCatcher,
  waitForOutboxIdle,
  waitUntil,
  type Catcher,
} from '@/tests/helpers/fault-tools';
import { models } from '@/models';
import { sequelize } from '@/lib/db';
import { deliverOutbox } from '@/lib/mail/outbox';
import { feedbackDir, uploadDir, uploadPath } from '@/lib/storage';
import { sweepGraceMs, sweepOrphanFiles } from '@/lib/storage-sweep';
import { acceptProposal, saveMarks } from '@/lib/marking/marks';
import { createCheckedSubmission, createFixturePractical } from '@/lib/marking/test-fixtures';
import { POST as releaseRoute } from '@/app/api/release/route';
import { PUT as saveDraftRoute } from '@/app/api/submissions/draft/route';
import { POST as submitRoute } from '@/app/api/submissions/[id]/submit/route';
import { PUT as saveMarksRoute } from '@/app/api/marking/[submissionId]/route';

// A catcher of this file's own, beside the suite's; moved with the suite's ports so two checkouts' runs cannot collide.
const SMTP = Number(process.env.OSCILLAB_TEST_SMTP_PORT ?? 1125) + 600;
const WEB = Number(process.env.OSCILLAB_TEST_WEB_PORT ?? 1180) + 600;
let catcher: Catcher | null = null;
let w: World;
const children = new Set<ChildProcess>();
const later = (minutes: number) => () => new Date(Date.now() + minutes * 60_000);

beforeAll(async () => {
  process.env.MAILDEV_API = `http://127.0.0.1:${WEB}`;
  w = await buildWorld();
});

afterAll(async () => {
  for (const c of children) if (c.exitCode === null) c.kill('SIGKILL');
  try {
    await waitForOutboxIdle(10_000).catch(() => undefined);
  } finally {
    await catcher?.stop();
  }
});

let batchNo = 0;
/** `n` students of the cohort, each with a checked attempt marked in full by the TA. */
async function markedBatch(n: number) {
  const { User, CourseMembership } = models();
  const tag = ++batchNo;
  const practical = await createFixturePractical(w.course.id, [w.cohort.id]);
  const out: { id: number; email: string }[] = [];
  for (let i = 0; i < n; i++) {
    const s = await User.create({
      email: `fault.${tag}.${i}@test.example`,
      name: `Fault Student ${tag}.${i}`,
      passwordHash: null,
      isAdmin: false,
      studentNumber: `F${tag}${i}`,
    });
    await CourseMembership.create({ userId: s.id, courseId: w.course.id, role: 'student', cohortId: w.cohort.id });
    const sub = await createCheckedSubmission({ practicalId: practical.id, cohortId: w.cohort.id, studentId: s.id, slip: i % 3 === 0 });
    const r = await acceptProposal(w.people.ta.id, sub.id, sub.version);
    await saveMarks(w.people.ta.id, sub.id, { version: r.version, items: [{ itemKey: 'rubric:discussion', awarded: 1 }] });
    out.push({ id: sub.id, email: s.email });
  }
  return out;
}

/** For every submission: released ⇔ exactly one feedback document and one outbox row; marked ⇔ none. */
async function assertReleaseConsistent(ids: number[]) {
  const { Submission, FeedbackDocument, EmailOutbox } = models();
  const counts = { released: 0, marked: 0 };
  for (const id of ids) {
    const s = (await Submission.findByPk(id))!;
    const docs = await FeedbackDocument.count({ where: { submissionId: id } });
    const mails = await EmailOutbox.count({ where: { submissionId: id } });
    if (s.status === 'released') {
      counts.released++;
      expect([docs, mails], `submission ${id}`).toEqual([1, 1]);
    } else {
      counts.marked++;
      expect(s.status).toBe('marked');
      expect([docs, mails], `submission ${id}`).toEqual([0, 0]);
    }
  }
  return counts;
}

function spawnReleaseChild(ids: number[], smtpUrl: string) {
  const child = spawn(
    process.execPath,
    ['--conditions=react-server', '--import', 'tsx', path.resolve('tests/helpers/release-child.ts'), String(w.people.ta.id), ids.join(',')],
    {
      cwd: process.cwd(),
      env: { ...process.env, SMTP_URL: smtpUrl, OUTBOX_WORKER: 'off' },
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  children.add(child);
  let out = '';
  child.stdout!.on('data', (d) => (out += d));
  child.stderr!.on('data', (d) => (out += d));
  const exited = new Promise<NodeJS.Signals | number | null>((r) => child.once('exit', (code, signal) => r(signal ?? code)));
  return { child, exited, output: () => out };
}

describe('SMTP down during a release', () => {
  it(
    'everything stays queued with attempts and the error; once SMTP is up each message goes exactly once',
    { timeout: 60_000 },
    async () => {
      const { EmailOutbox, Submission } = models();
      const batch = await markedBatch(4);
      const ids = batch.map((b) => b.id);
      // The catcher's own SMTP port, with the catcher not running yet: SMTP is simply down, and
      // comes up later at the same address. (If something already listens there, a closed port.)
      const alreadyUp = await fetch(`http://127.0.0.1:${WEB}/api/email`).then(
        (r) => r.ok,
        () => false,
      );
      process.env.SMTP_URL = `smtp://127.0.0.1:${alreadyUp ? await closedPort() : SMTP}`;

      const res = await releaseRoute(await apiRequest('/api/release', { as: w.people.ta.id, body: { submissionIds: ids } }), {});
      expect(res.status).toBe(200);
      expect((await res.json()).released).toBe(4);
      await waitForOutboxIdle(); // the route's own delivery attempt fails: nothing listens
      expect((await deliverOutbox()).sent).toBe(0); // backing off, not hammering

      const rows = await EmailOutbox.findAll({ where: { submissionId: ids } });
      expect(rows).toHaveLength(4);
      for (const r of rows) {
        expect(r.status).toBe('queued');
        expect(r.attempts).toBeGreaterThanOrEqual(1);
        expect(r.lastError).toMatch(/ECONNREFUSED|connect/i);
        expect(r.nextAttemptAt.getTime()).toBeGreaterThan(Date.now());
      }
      expect(await Submission.count({ where: { id: ids, status: 'released' } })).toBe(4);

      catcher = await startCatcher(SMTP, WEB); // SMTP comes up (and SMTP_URL points at it)
      const [a, b] = await Promise.all([deliverOutbox({ now: later(60) }), deliverOutbox({ now: later(60) })]);
      expect(a.sent + b.sent).toBe(4);
      expect((await deliverOutbox({ now: later(60) })).sent).toBe(0);
      for (const s of batch) {
        const mail = await mailTo(s.email);
        expect(mail).toHaveLength(1);
        expect(mail[0].attachments?.[0]?.contentType).toBe('application/pdf');
      }
      expect(await caughtMail()).toHaveLength(4);
      const sent = await EmailOutbox.findAll({ where: { submissionId: ids } });
      expect(sent.every((r) => r.status === 'sent' && r.lastError === null && r.messageId)).toBe(true);
    },
  );
});

describe('the app process killed mid-release', () => {
  it(
    'SIGKILL during the release loop, then during delivery: after recovery every student has exactly one e-mail',
    { timeout: 90_000 },
    async () => {
      const { Submission, EmailOutbox, FeedbackDocument } = models();
      if (!catcher) catcher = await startCatcher(SMTP, WEB);
      await clearMail();
      const batch = await markedBatch(10);
      const ids = batch.map((b) => b.id);
      const released = () => Submission.count({ where: { id: ids, status: 'released' } });
      const pdfsBefore = new Set(fs.readdirSync(feedbackDir()));

      // 1. Killed while releasing: as soon as the first release has committed.
      const first = spawnReleaseChild(ids, process.env.SMTP_URL!);
      await waitUntil('the first release to commit', async () => (await released()) >= 1, 60_000, 10);
      first.child.kill('SIGKILL');
      expect(await first.exited).toBe('SIGKILL');
      const afterKill = await assertReleaseConsistent(ids);
      console.log('[faults] killed mid-release after', afterKill.released, 'of', ids.length, 'releases');
      expect(afterKill.released).toBeGreaterThanOrEqual(1);
      expect(afterKill.released).toBeLessThan(ids.length);
      if (process.env.DATABASE_URL?.startsWith('sqlite:'))
        expect(await sequelize().query('PRAGMA integrity_check', { type: QueryTypes.SELECT })).toEqual([{ integrity_check: 'ok' }]);
      // A PDF whose release was killed before its transaction committed may be left without its
      // row; never the reverse. Releases of a batch run a few at once (releaseLanes) and write their
      // files before their group's transaction, so as many files as were under way at the kill.
      const docs = await FeedbackDocument.findAll({ where: { submissionId: ids } });
      for (const d of docs) expect(fs.existsSync(path.join(feedbackDir(), d.storedName))).toBe(true);
      const orphans = () => fs.readdirSync(feedbackDir()).filter((f) => !pdfsBefore.has(f) && !docs.some((d) => d.storedName === f));
      expect(orphans().length).toBeLessThanOrEqual(releaseLanes());
      // The storage sweep (past its grace period) removes such a file and keeps every PDF a row refers to.
      const swept = await sweepOrphanFiles({ now: new Date(Date.now() + sweepGraceMs()) });
      expect(orphans()).toEqual([]);
      expect(swept.removed.every((f) => !docs.some((d) => f.endsWith(d.storedName)))).toBe(true);
      for (const d of docs) expect(fs.existsSync(path.join(feedbackDir(), d.storedName))).toBe(true);

      // 2. The batch is released again (what the marker does after the crash), now with an SMTP
      // relay that passes two messages and then hangs; killed while the third is being sent.
      const relay = await stallingRelay(SMTP, 2);
      const second = spawnReleaseChild(ids, `smtp://127.0.0.1:${relay.port}`);
      await Promise.race([
        relay.stalled,
        second.exited.then(() => {
          throw new Error(`child ended before delivery stalled:\n${second.output()}`);
        }),
      ]);
      await new Promise((r) => setTimeout(r, 300));
      second.child.kill('SIGKILL');
      await second.exited;
      await relay.close();
      expect(await released()).toBe(ids.length);
      await assertReleaseConsistent(ids);
      const inFlight = await EmailOutbox.count({ where: { submissionId: ids, status: 'sending' } });
      const sentBefore = await EmailOutbox.count({ where: { submissionId: ids, status: 'sent' } });
      console.log('[faults] killed mid-delivery:', sentBefore, 'sent,', inFlight, 'in flight');
      expect(inFlight).toBeGreaterThanOrEqual(1);
      expect(sentBefore).toBeGreaterThanOrEqual(1);
      // What the outbox says was sent is exactly what reached the catcher.
      expect((await caughtMail()).length).toBe(sentBefore);

      // 3. Recovery in this process: queued rows go now; a row whose sender died keeps its lease
      // (60 s) and is left alone until the lease expires, then it is sent.
      process.env.SMTP_URL = `smtp://127.0.0.1:${SMTP}`;
      const now = await deliverOutbox();
      expect(now.sent).toBe(ids.length - sentBefore - inFlight);
      expect(await EmailOutbox.count({ where: { submissionId: ids, status: 'sending' } })).toBe(inFlight);
      const expired = await deliverOutbox({ now: later(2) });
      expect(expired.sent).toBe(inFlight);
      expect((await deliverOutbox({ now: later(2) })).sent).toBe(0);

      expect(await EmailOutbox.count({ where: { submissionId: ids, status: 'sent' } })).toBe(ids.length);
      for (const s of batch) expect(await mailTo(s.email), s.email).toHaveLength(1);
      expect(await caughtMail()).toHaveLength(ids.length);
    },
  );
});

// SQLite's single-writer lock; PostgreSQL locks rows and has no such whole-database lock.
describe.skipIf(!process.env.DATABASE_URL?.startsWith('sqlite:'))('the database locked briefly by another connection', () => {
  it('submitting, autosaving and saving marks wait for the lock (~1.2 s) and succeed; no 500', { timeout: 60_000 }, async () => {
    const { Submission, Mark } = models();
    const { practical } = await buildPractical(w);
    const draft = draftFor('H35Cl', correctValues());
    const saved = await saveDraftRoute(
      await apiRequest('/api/submissions/draft', { as: w.people.student.id, method: 'PUT', body: { practicalId: practical.id, draft } }),
      {},
    );
    const { id: draftId, version } = await saved.json();
    const markPractical = await createFixturePractical(w.course.id, [w.cohort.id]);
    const toMark = await createCheckedSubmission({
      practicalId: markPractical.id,
      cohortId: w.cohort.id,
      studentId: w.people.otherStudent.id,
    });
    const markVersion = (await acceptProposal(w.people.ta.id, toMark.id, toMark.version)).version;
    const { practical: autosavePractical } = await buildPractical(w);

    const lock = await holdWriteLock(sqliteFile(), 1200);
    const timed = async (what: string, p: Promise<Response>) => {
      const res = await p;
      return { what, status: res.status, body: await res.json(), doneAt: Date.now() };
    };
    const results = await Promise.all([
      timed(
        'submit',
        submitRoute(
          await apiRequest(`/api/submissions/${draftId}/submit`, { as: w.people.student.id, body: { version, draft } }),
          params({ id: String(draftId) }),
        ),
      ),
      timed(
        'marks',
        saveMarksRoute(
          await apiRequest(`/api/marking/${toMark.id}`, {
            as: w.people.ta.id,
            method: 'PUT',
            body: { version: markVersion, items: [{ itemKey: 'rubric:discussion', awarded: 2, comment: 'Saved while locked' }] },
          }),
          params({ submissionId: String(toMark.id) }),
        ),
      ),
      timed(
        'draft',
        saveDraftRoute(
          await apiRequest('/api/submissions/draft', {
            as: w.people.student.id,
            method: 'PUT',
            body: { practicalId: autosavePractical.id, draft },
          }),
          {},
        ),
      ),
    ]);
    await lock.released;
    for (const r of results) {
      expect(r.status, `${r.what}: ${JSON.stringify(r.body)}`).toBeLessThan(300);
      // It really had to wait for the other connection's COMMIT.
      expect(r.doneAt - lock.heldAt, r.what).toBeGreaterThanOrEqual(1000);
    }
    console.log('[faults] waited for the lock:', results.map((r) => `${r.what} ${r.doneAt - lock.heldAt} ms`).join(', '));
    expect(await Submission.count({ where: { practicalId: practical.id, studentId: w.people.student.id, attempt: 1 } })).toBe(1);
    const mark = (await Mark.findOne({ where: { submissionId: toMark.id, itemKey: 'rubric:discussion' } }))!;
    expect([mark.awarded, mark.comment]).toEqual([2, 'Saved while locked']);
    expect(await Submission.count({ where: { practicalId: autosavePractical.id, attempt: 0 } })).toBe(1);
  });
});

describe('the disk failing under an upload', () => {
  const sha = (file: string) => crypto.createHash('sha256').update(fs.readFileSync(file)).digest('hex');
  const listing = (dir: string) =>
    fs
      .readdirSync(dir)
      .filter((f) => f !== 'feedback')
      .sort();
  let ctx: Awaited<ReturnType<typeof submittedWithFile>>;

  afterEach(() => {
    vi.restoreAllMocks();
  });

  /** `student` submits an attempt with a spectrum; the draft stays for a next attempt. */
  async function submittedWithFile() {
    const { Submission, Upload } = models();
    const { practical } = await buildPractical(w);
    const draft = draftFor('H35Cl', correctValues());
    const saved = await (
      await saveDraftRoute(
        await apiRequest('/api/submissions/draft', { as: w.people.student.id, method: 'PUT', body: { practicalId: practical.id, draft } }),
        {},
      )
    ).json();
    const up = await uploadAs(w.people.student.id, saved.id, 'spectrum', 'hcl.jdx', JCAMP);
    expect(up.status).toBe(201);
    const upBody = await up.json();
    const submitted = await submitRoute(
      await apiRequest(`/api/submissions/${saved.id}/submit`, {
        as: w.people.student.id,
        body: { version: upBody.version, draft: { ...draft, spectrumUploadId: upBody.id } },
      }),
      params({ id: String(saved.id) }),
    );
    expect(submitted.status).toBe(201);
    const attemptId = (await submitted.json()).result.id as number;
    const file = (await Upload.findOne({ where: { submissionId: attemptId } }))!;
    return {
      draftId: saved.id as number,
      attemptId,
      storedName: file.storedName,
      fileSha: sha(uploadPath(file.storedName)),
      draftRow: (await Submission.findByPk(saved.id))!.toJSON(),
    };
  }

  async function assertNothingChanged(before: { uploads: number; files: string[] }) {
    const { Upload, Submission } = models();
    expect(await Upload.count()).toBe(before.uploads);
    expect(listing(uploadDir())).toEqual(before.files); // no partial file, no .part left behind
    const draftRow = (await Submission.findByPk(ctx.draftId))!.toJSON();
    expect(draftRow.version).toBe(ctx.draftRow.version);
    expect(draftRow.draft).toEqual(ctx.draftRow.draft);
    // The earlier attempt and its file are untouched.
    const file = (await Upload.findOne({ where: { submissionId: ctx.attemptId } }))!;
    expect(file.storedName).toBe(ctx.storedName);
    expect(sha(uploadPath(ctx.storedName))).toBe(ctx.fileSha);
  }

  it(
    'the disk fills up half-way through writing the file (ENOSPC): 507 with a clear message, nothing half-written',
    { timeout: 60_000 },
    async () => {
      ctx = await submittedWithFile();
      const before = { uploads: await models().Upload.count(), files: listing(uploadDir()) };
      const realCreate = fs.createWriteStream.bind(fs);
      let failed = 0;
      vi.spyOn(fs, 'createWriteStream').mockImplementation(((file: fs.PathLike, options?: never) => {
        const ws = realCreate(file, options);
        const write = ws._write.bind(ws);
        // Half of the first chunk reaches the disk, then the device is full.
        ws._write = (chunk: Buffer, encoding: BufferEncoding, cb: (e?: Error | null) => void) =>
          write(chunk.subarray(0, Math.ceil(chunk.length / 2)), encoding, () => {
            failed++;
            cb(Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC', errno: -28, syscall: 'write' }));
          });
        return ws;
      }) as never);
      const res = await uploadAs(w.people.student.id, ctx.draftId, 'spectrum', 'hcl-again.jdx', JCAMP);
      const body = await res.json();
      expect(failed).toBeGreaterThanOrEqual(1); // the stub really was on the write path
      expect(res.status, JSON.stringify(body)).toBe(507);
      expect(body.error).toMatch(/no room|space/i);
      expect(body.error).toMatch(/not saved/i);
      await assertNothingChanged(before);
    },
  );

  it(
    'the upload folder cannot be written at all (not a directory): 503 with a clear message, nothing written',
    { timeout: 30_000 },
    async () => {
      const before = { uploads: await models().Upload.count(), files: listing(uploadDir()) };
      const real = process.env.UPLOAD_DIR!;
      const notADir = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-full-')), 'uploads');
      fs.writeFileSync(notADir, 'a file where the upload folder should be');
      process.env.UPLOAD_DIR = notADir;
      let res: Response;
      try {
        res = await uploadAs(w.people.student.id, ctx.draftId, 'spectrum', 'hcl-again.jdx', JCAMP);
      } finally {
        process.env.UPLOAD_DIR = real;
        fs.rmSync(path.dirname(notADir), { recursive: true, force: true });
      }
      const body = await res.json();
      expect(res.status, JSON.stringify(body)).toBe(503);
      expect(body.error).toMatch(/storage|cannot be stored|unavailable/i);
      expect(body.error).toMatch(/not saved/i);
      await assertNothingChanged(before);
      // And once storage is back, the same upload goes through.
      const ok = await uploadAs(w.people.student.id, ctx.draftId, 'spectrum', 'hcl-again.jdx', JCAMP);
      expect(ok.status).toBe(201);
      expect(await models().Upload.count({ where: { submissionId: { [Op.in]: [ctx.draftId] } } })).toBe(1);
    },
  );
});
