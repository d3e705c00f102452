/**
 * Release benchmark: `npm run bench:release -- [count=300]`.
 *
 * Builds a temporary SQLite database with `count` checked, marked submissions, then in one run:
 *   1. releases them all through the app as the release route does (releaseMany: read, render the
 *      PDF on the worker threads, commit in groups — per part, summed over submissions, and the
 *      batch's wall time), each group's e-mails sent from the outbox as soon as it commits
 *      (deliverSoon, pooled SMTP) to a mail catcher this script starts, until the last is sent;
 *   2. the bare parts done the fast way, with no app code: pdf-lib drawing the same strings and
 *      paths with fonts embedded once per thread, on as many worker threads as the app uses; and
 *      nodemailer sending the same messages through a pooled transport, as many at once as the
 *      app's pool;
 *   3. for reference, the naive bare PDF (pdf-lib's per-document font subset, one thread), timed
 *      on a sample and scaled to the batch.
 * Prints submissions/s, per-part times and the ratio release (1) / bare (2). Targets: the whole
 * cohort released and delivered in < 30 s, ratio ≤ 1.5. BENCH_PORT sets the catcher's ports
 * (BENCH_PORT and +1; free ports otherwise); PDF_WORKERS and SMTP_POOL_SIZE as for the app.
 */
import { execFileSync, spawn } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { Worker } from 'node:worker_threads';

const COUNT = Number(process.argv[2] ?? 300);
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-bench-'));

async function freePort(): Promise<number> {
  const s = net.createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', () => r()));
  const port = (s.address() as net.AddressInfo).port;
  await new Promise((r) => s.close(r));
  return port;
}

async function waitFor(url: string) {
  for (let i = 0; i < 100; i++) {
    try {
      if ((await fetch(url)).ok) return;
    } catch {}
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error('mail catcher did not start');
}

async function caught(api: string): Promise<number> {
  return ((await (await fetch(`${api}/api/email`)).json()) as unknown[]).length;
}

const s = (ms: number) => `${(ms / 1000).toFixed(2)} s`;
const load = () =>
  os
    .loadavg()
    .map((x) => x.toFixed(2))
    .join(' ');

async function main() {
  const base = Number(process.env.BENCH_PORT || 0);
  const SMTP = base || (await freePort());
  const WEB = base ? base + 1 : await freePort();
  process.env.DATABASE_URL = `sqlite:${path.join(dir, 'bench.sqlite')}`;
  process.env.UPLOAD_DIR = path.join(dir, 'uploads');
  process.env.SMTP_URL = `smtp://127.0.0.1:${SMTP}`;
  process.env.OUTBOX_WORKER = 'off';
  // tsx turns on source maps for stack traces in this thread; the production server (next start)
  // runs without them. Sequelize formats a stack for every statement it runs, which with source
  // maps costs about three times as much (19.5 µs against 6.1 µs for a stack nine frames deep,
  // measured here), so the app's side is measured as it runs in production.
  process.setSourceMapsEnabled(false);
  // Outbox runs log a line each (lib/log.ts); only warnings and errors here, unless asked.
  process.env.LOG_LEVEL ??= 'warn';
  execFileSync(process.execPath, [path.resolve('node_modules/sequelize-cli/lib/sequelize'), 'db:migrate'], {
    env: process.env,
    stdio: 'pipe',
  });
  const catcher = spawn(process.execPath, [path.resolve('scripts/maildev.mjs'), String(SMTP), String(WEB)], { stdio: 'ignore' });
  const api = `http://127.0.0.1:${WEB}`;
  try {
    await waitFor(`${api}/api/email`);
    const { models } = await import('@/models');
    const { createCheckedSubmission, createFixturePractical } = await import('@/lib/marking/test-fixtures');
    const { acceptProposal, saveMarks } = await import('@/lib/marking/marks');
    const { releaseMany } = await import('@/lib/marking/release');
    const { deliverOutbox, deliverSoon } = await import('@/lib/mail/outbox');
    const { closeTransport, smtpPoolSize } = await import('@/lib/mail/transport');
    const { loadMarkingView } = await import('@/lib/marking/view');
    const { feedbackInputFromView } = await import('@/lib/marking/feedback-input');
    const { pdfWorkerCount, stopPdfWorkers } = await import('@/lib/pdf/pool');
    const { barePdf } = await import('./bench-release-bare');
    const nodemailer = (await import('nodemailer')).default;
    const { closeDatabase } = await import('@/lib/db');

    const { User, Course, Cohort, CourseMembership, TaAssignment, EmailOutbox, FeedbackDocument } = models();
    const course = await Course.create({ code: 'BENCH1', title: 'Benchmark course', archivedAt: null });
    const cohort = await Cohort.create({ courseId: course.id, name: 'Bench cohort', term: '2026', instrument: null, archivedAt: null });
    const ta = await User.create({ email: 'ta@bench.example', name: 'Bench TA', passwordHash: null, isAdmin: false, studentNumber: null });
    await CourseMembership.create({ userId: ta.id, courseId: course.id, role: 'ta', cohortId: null });
    await TaAssignment.create({ cohortId: cohort.id, taId: ta.id, studentId: null });
    const practical = await createFixturePractical(course.id, [cohort.id]);
    const ids: number[] = [];
    process.stdout.write(`Building ${COUNT} checked, marked submissions… `);
    for (let i = 0; i < COUNT; i++) {
      const st = await User.create({
        email: `s${i}@bench.example`,
        name: `Student ${i}`,
        passwordHash: null,
        isAdmin: false,
        studentNumber: `B${i}`,
      });
      await CourseMembership.create({ userId: st.id, courseId: course.id, role: 'student', cohortId: cohort.id });
      const sub = await createCheckedSubmission({
        practicalId: practical.id,
        cohortId: cohort.id,
        studentId: st.id,
        slip: i % 3 === 0,
        offset: (i % 7) * 0.3,
      });
      const r = await acceptProposal(ta.id, sub.id, sub.version);
      await saveMarks(ta.id, sub.id, { version: r.version, items: [{ itemKey: 'rubric:discussion', awarded: 1 }] });
      ids.push(sub.id);
    }
    console.log('done.');
    const inputs: ReturnType<typeof feedbackInputFromView>[] = [];
    for (const id of ids) inputs.push(feedbackInputFromView(await loadMarkingView(id)));
    const workers = pdfWorkerCount();
    const pool = smtpPoolSize();
    console.log(`${os.cpus().length} CPUs, load average ${load()}; ${workers} PDF worker thread(s), SMTP pool of ${pool}`);

    // 1. The whole release through the app.
    const timings = { load: 0, render: 0, commit: 0, wall: 0 };
    const t0 = performance.now();
    // As POST /api/release does: each group's e-mails go out as soon as it commits.
    const outcomes = await releaseMany(ta.id, ids, { timings, afterCommit: () => void deliverSoon() });
    const tReleased = performance.now() - t0;
    await deliverSoon();
    let report = await deliverOutbox({ limit: COUNT + 10 });
    while (report.remaining > 0) report = await deliverOutbox({ limit: COUNT + 10, now: () => new Date(Date.now() + 3600_000) });
    const tRelease = performance.now() - t0;
    const tDelivery = tRelease - tReleased;
    const ok = outcomes.filter((o) => o.ok).length;
    const sent = await EmailOutbox.count({ where: { status: 'sent' } });
    if (ok !== COUNT || sent !== COUNT) throw new Error(`released ${ok}, sent ${sent} of ${COUNT}`);
    const inCatcher = await caught(api);
    await stopPdfWorkers();
    closeTransport();

    // 2a. Bare PDFs, the fast way: fonts embedded once per thread, on the same number of threads.
    const t1 = performance.now();
    if (workers > 0) {
      const threads = Array.from({ length: workers }, () => new Worker(path.resolve('scripts/bench-release-bare-worker.cjs')));
      await Promise.all(threads.map((w) => new Promise<void>((resolve) => w.once('message', () => resolve()))));
      let next = 0;
      await Promise.all(
        threads.map(async (w) => {
          while (next < inputs.length) {
            const id = next++;
            await new Promise<void>((resolve) => {
              w.once('message', () => resolve());
              w.postMessage({ id, input: inputs[id] });
            });
          }
        }),
      );
      await Promise.all(threads.map((w) => w.terminate()));
    } else {
      for (const input of inputs) await barePdf(input, 'fast');
    }
    const tPdf = performance.now() - t1;

    // 2b. Bare nodemailer: the same messages with the PDFs as released, pooled, as many at once as the app's pool.
    await fetch(`${api}/api/email/all`, { method: 'DELETE' });
    const rows = await EmailOutbox.findAll({ order: [['id', 'ASC']] });
    const docs = new Map((await FeedbackDocument.findAll()).map((d) => [d.id, d]));
    const attachments = rows.map((r) =>
      fs.readFileSync(path.join(process.env.UPLOAD_DIR!, 'feedback', docs.get(r.feedbackDocumentId!)!.storedName)),
    );
    const transport = nodemailer.createTransport({ host: '127.0.0.1', port: SMTP, pool: true, maxConnections: pool });
    const t2 = performance.now();
    let m = 0;
    await Promise.all(
      Array.from({ length: pool }, async () => {
        while (m < rows.length) {
          const i = m++;
          await transport.sendMail({
            from: 'bench@oscillab.invalid',
            to: rows[i].toAddress,
            subject: rows[i].subject,
            text: rows[i].textBody,
            attachments: [{ filename: 'feedback.pdf', content: attachments[i], contentType: 'application/pdf' }],
          });
        }
      }),
    );
    const tMail = performance.now() - t2;
    transport.close();

    // 3. For reference: the naive bare PDF (pdf-lib's own per-document subset, one thread), on a sample.
    const sample = inputs.slice(0, Math.min(20, inputs.length));
    const t3 = performance.now();
    for (const input of sample) await barePdf(input, 'naive');
    const naivePerPdf = (performance.now() - t3) / sample.length;

    const bare = tPdf + tMail;
    const avgPdf = docs.size ? [...docs.values()].reduce((a, d) => a + d.size, 0) / docs.size : 0;
    console.log(
      `\nReleased and delivered ${COUNT} submissions in ${s(tRelease)}: ${(COUNT / (tRelease / 1000)).toFixed(1)} submissions/s (${inCatcher} e-mails in the catcher; PDFs ${(avgPdf / 1024).toFixed(0)} KB on average)`,
    );
    console.log(
      `  release (releaseMany)  ${s(tReleased)} wall — summed over submissions: read ${s(timings.load)}, render ${s(timings.render)} (on ${workers} thread(s)), commit ${s(timings.commit)}`,
    );
    console.log(`  delivery (outbox)      alongside the release; the last e-mail sent ${s(tDelivery)} after the last release committed`);
    console.log(
      `Bare parts, the fast way: pdf-lib ${s(tPdf)} (${(tPdf / COUNT).toFixed(1)} ms per PDF on ${Math.max(1, workers)} thread(s), fonts embedded once per thread) + nodemailer ${s(tMail)} (${(tMail / COUNT).toFixed(1)} ms per e-mail, pool of ${pool}) = ${s(bare)}`,
    );
    console.log(
      `  for reference, the naive bare PDF (subset per document, one thread): ${naivePerPdf.toFixed(0)} ms per PDF → ${s(naivePerPdf * COUNT)} for the batch`,
    );
    console.log(
      `Ratio release / bare parts: ${(tRelease / bare).toFixed(2)}× (target ≤ 1.5×) → ${tRelease / bare <= 1.5 ? 'met' : 'NOT met'}`,
    );
    console.log(
      `Whole batch in ${s(tRelease)} (target < 30 s for 300) → ${tRelease < 30_000 * (COUNT / 300) ? 'met' : 'NOT met'}; load average at end ${load()}`,
    );
    await closeDatabase();
  } finally {
    catcher.kill('SIGTERM');
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

main().then(
  () => process.exit(0),
  (e) => {
    console.error(e);
    process.exit(1);
  },
);
