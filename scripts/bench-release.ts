/**
 * Release benchmark: `npx tsx scripts/bench-release.ts [count=300]`.
 * Builds a temporary database with `count` checked, marked submissions, releases them all
 * (PDF + outbox + delivery to a mail catcher this script starts), then, in the same run,
 * times the bare parts: pdf-lib drawing the same text and paths with the same fonts and no
 * app code, and nodemailer sending the same messages with no app code. Prints submissions/s
 * and the ratio release / (bare PDF + bare mail). Target ≤ 1.5.
 */
import { execFileSync, spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const COUNT = Number(process.argv[2] ?? 300);
const SMTP = 1425;
const WEB = 1480;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-bench-'));
process.env.DATABASE_URL = `sqlite:${path.join(dir, 'bench.sqlite')}`;
process.env.UPLOAD_DIR = path.join(dir, 'uploads');
process.env.SMTP_URL = `smtp://127.0.0.1:${SMTP}`;
process.env.OUTBOX_WORKER = 'off';

async function waitFor(url: string) {
  for (let i = 0; i < 100; i++) {
    try {
      if ((await fetch(url)).ok) return;
    } catch {}
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error('mail catcher did not start');
}

async function main() {
  execFileSync(process.execPath, [path.resolve('node_modules/sequelize-cli/lib/sequelize'), 'db:migrate'], { env: process.env, stdio: 'pipe' });
  const catcher = spawn(process.execPath, [path.resolve('scripts/maildev.mjs'), String(SMTP), String(WEB)], { stdio: 'ignore' });
  try {
    await waitFor(`http://127.0.0.1:${WEB}/api/email`);
    const { models } = await import('@/models');
    const { createCheckedSubmission, createFixturePractical } = await import('@/lib/marking/test-fixtures');
    const { acceptProposal, saveMarks } = await import('@/lib/marking/marks');
    const { releaseMany } = await import('@/lib/marking/release');
    const { deliverOutbox } = await import('@/lib/mail/outbox');
    const { loadMarkingView } = await import('@/lib/marking/view');
    const { feedbackInputFromView } = await import('@/lib/marking/feedback-input');
    const { PDFDocument } = await import('pdf-lib');
    const fontkit = (await import('@pdf-lib/fontkit')).default;
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
      const s = await User.create({ email: `s${i}@bench.example`, name: `Student ${i}`, passwordHash: null, isAdmin: false, studentNumber: `B${i}` });
      await CourseMembership.create({ userId: s.id, courseId: course.id, role: 'student', cohortId: cohort.id });
      const sub = await createCheckedSubmission({ practicalId: practical.id, cohortId: cohort.id, studentId: s.id, slip: i % 3 === 0, offset: (i % 7) * 0.3 });
      const r = await acceptProposal(ta.id, sub.id, sub.version);
      await saveMarks(ta.id, sub.id, { version: r.version, items: [{ itemKey: 'rubric:discussion', awarded: 1 }] });
      ids.push(sub.id);
    }
    console.log('done.');
    // Capture the inputs before release so the bare PDF part draws the same content.
    const inputs = [];
    for (const id of ids) inputs.push(feedbackInputFromView(await loadMarkingView(id)));

    // 1. The whole release through the app.
    const t0 = performance.now();
    const outcomes = await releaseMany(ta.id, ids);
    let report = await deliverOutbox({ limit: COUNT + 10 });
    while (report.remaining > 0) report = await deliverOutbox({ limit: COUNT + 10, now: () => new Date(Date.now() + 3600_000) });
    const tRelease = performance.now() - t0;
    const ok = outcomes.filter((o) => o.ok).length;
    const sent = await EmailOutbox.count({ where: { status: 'sent' } });
    if (ok !== COUNT || sent !== COUNT) throw new Error(`released ${ok}, sent ${sent} of ${COUNT}`);

    // 2. Bare pdf-lib: same fonts (subset), same strings and vector paths, no app code.
    const fontDir = path.resolve('public/fonts');
    const fonts = ['DejaVuSans.ttf', 'DejaVuSans-Bold.ttf', 'DejaVuSansMono.ttf'].map((f) => fs.readFileSync(path.join(fontDir, f)));
    const t1 = performance.now();
    for (const input of inputs) {
      const doc = await PDFDocument.create();
      doc.registerFontkit(fontkit);
      const f = [await doc.embedFont(fonts[0], { subset: true }), await doc.embedFont(fonts[1], { subset: true }), await doc.embedFont(fonts[2], { subset: true })];
      const strings = [input.course, input.practical, input.cohort, input.student, input.submittedAt, ...input.quantities.flatMap((q) => [q.label, q.reported, q.marks, ...q.rows.flatMap((r) => [r.basis, r.expected, r.deviation, r.verdict])]), ...input.slips.flatMap((s) => [s.title, s.quantity, s.explanation, s.formula]), ...input.comments.map((c) => c.text), input.sum, input.total];
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
      for (const p of input.plots) for (const model of [p.fit, p.residuals]) {
        page = doc.addPage([595.28, 841.89]);
        page.drawSvgPath(model.curve.map(([x, yy], i) => `${i ? 'L' : 'M'}${x} ${yy}`).join(' ') || 'M0 0', { x: 42, y: 800, borderWidth: 0.8 });
        for (const m of model.markers) page.drawSvgPath(`M${m.x - 3} ${m.y - 3} L${m.x + 3} ${m.y - 3} L${m.x} ${m.y + 3} Z`, { x: 42, y: 800 });
        for (const t of [...model.xAxis.ticks, ...model.yAxis.ticks]) page.drawText(t.label, { x: 42 + t.pos, y: 500, size: 7, font: f[2] });
      }
      await doc.save();
    }
    const tPdf = performance.now() - t1;

    // 3. Bare nodemailer: the same messages (with the PDFs as released), no app code.
    const rows = await EmailOutbox.findAll({ order: [['id', 'ASC']] });
    const docs = new Map((await FeedbackDocument.findAll()).map((d) => [d.id, d]));
    const attachments = rows.map((r) => fs.readFileSync(path.join(process.env.UPLOAD_DIR!, 'feedback', docs.get(r.feedbackDocumentId!)!.storedName)));
    const transport = nodemailer.createTransport(`smtp://127.0.0.1:${SMTP}`);
    const t2 = performance.now();
    for (let i = 0; i < rows.length; i++) {
      await transport.sendMail({ from: 'bench@oscillab.invalid', to: rows[i].toAddress, subject: rows[i].subject, text: rows[i].textBody, attachments: [{ filename: 'feedback.pdf', content: attachments[i], contentType: 'application/pdf' }] });
    }
    const tMail = performance.now() - t2;
    transport.close();

    const bare = tPdf + tMail;
    console.log(`Released ${COUNT} submissions in ${(tRelease / 1000).toFixed(2)} s: ${(COUNT / (tRelease / 1000)).toFixed(1)} submissions/s`);
    console.log(`Bare parts: pdf-lib ${(tPdf / 1000).toFixed(2)} s + nodemailer ${(tMail / 1000).toFixed(2)} s = ${(bare / 1000).toFixed(2)} s`);
    console.log(`Ratio release / bare parts: ${(tRelease / bare).toFixed(2)}× (target ≤ 1.5×)`);
    await closeDatabase();
  } finally {
    catcher.kill('SIGTERM');
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
