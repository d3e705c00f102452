/**
 * Cohort statistics: every figure the API computes in SQL is recomputed here, independently,
 * with simple-statistics (v7) on the same rows read back through the models.
 * Quantile definition: R type 7 (linear interpolation) = simple-statistics `quantileSorted`.
 * Spread: population standard deviation = simple-statistics `standardDeviation`.
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { PDFDocument } from 'pdf-lib';
import { mean, quantileSorted, standardDeviation, min, max } from 'simple-statistics';
import { GET as getStats } from '@/app/api/statistics/practicals/[id]/route';
import { GET as getCompare } from '@/app/api/statistics/practicals/[id]/compare/route';
import { GET as getMarksCsv } from '@/app/api/statistics/practicals/[id]/export/marks/route';
import { GET as getStatsCsv } from '@/app/api/statistics/practicals/[id]/export/statistics/route';
import { GET as getPdf } from '@/app/api/statistics/practicals/[id]/export/summary/route';
import { HISTOGRAM_EDGES_PERCENT, MARKS_CSV_LEADING, MARKS_CSV_TRAILING, STATS_CSV_HEADER } from '@/lib/statistics/definitions';
import type { PracticalReport } from '@/lib/statistics/report';
import type { Comparison } from '@/lib/statistics/compare';
import { QUANTITIES, SLIPS } from '@/lib/grading';
import { models } from '@/models';
import { apiRequest, params } from '../helpers/session';
import { buildWorld, type World } from '../helpers/world';
import { createPractical, seedSubmissions, SEED_QUANTITIES } from './statistics-seed';

let world: World;

/** The text of one page of a PDF, read with poppler's pdftotext (as the feedback PDF tests do). */
function pdfPageText(bytes: Uint8Array, page: number): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stats-pdf-'));
  const file = path.join(dir, 'summary.pdf');
  fs.writeFileSync(file, bytes);
  const text = execFileSync('pdftotext', ['-f', String(page), '-l', String(page), '-enc', 'UTF-8', file, '-']).toString('utf8');
  fs.rmSync(dir, { recursive: true, force: true });
  return text.replace(/\s+/g, ' ');
}
let practicalId: number;
let lastYearCohortId: number;
let instructorUserId: number;

async function students(cohortId: number, courseId: number, count: number, tag: string, firstName?: string) {
  const { User, CourseMembership } = models();
  const ids: number[] = [];
  for (let i = 0; i < count; i++) {
    const u = await User.create({
      email: `${tag}${i}@stats.example`,
      name: i === 0 && firstName ? firstName : `Student ${tag}${i}`,
      passwordHash: null,
      isAdmin: false,
      studentNumber: `${tag.toUpperCase()}${1000 + i}`,
    });
    await CourseMembership.create({ userId: u.id, courseId, role: 'student', cohortId });
    ids.push(u.id);
  }
  return ids;
}

const stats = async (as: number | null, query = '') =>
  getStats(await apiRequest(`/api/statistics/practicals/${practicalId}${query}`, { as }), params({ id: String(practicalId) }));

beforeAll(async () => {
  world = await buildWorld();
  const { Cohort, PracticalCohort } = models();
  const practical = await createPractical(world.course.id, [world.cohort.id, world.otherCohort.id]);
  practicalId = practical.id;
  instructorUserId = world.people.instructor.id;
  // 29 more students in cohort 1 (one with a name that a spreadsheet would run as a formula), 3 more in cohort 2.
  const c1 = [
    world.people.student.id,
    ...(await students(world.cohort.id, world.course.id, 29, 'a', '=HYPERLINK("http://x.example","click")')),
  ];
  const c2 = [world.people.otherStudent.id, ...(await students(world.otherCohort.id, world.course.id, 3, 'b'))];
  await seedSubmissions({
    practicalId,
    cohortId: world.cohort.id,
    studentIds: c1.slice(0, 28),
    markerIds: [world.people.ta.id, world.people.otherTa.id, instructorUserId],
    moderatorId: world.people.lead.id,
    seed: 7,
    firstMarkerBonus: 3,
  });
  await seedSubmissions({ practicalId, cohortId: world.otherCohort.id, studentIds: c2, markerIds: [world.people.otherTa.id], seed: 11 });
  // Last year's cohort of the same practical title (a copy), for the side-by-side comparison.
  const lastYear = await Cohort.create({
    courseId: world.course.id,
    name: 'Cohort 1',
    term: '2025 Autumn',
    instrument: 'Bench 1',
    archivedAt: null,
  });
  lastYearCohortId = lastYear.id;
  const old = await createPractical(world.course.id, [lastYear.id], 'HCl Fundamental Band ');
  void PracticalCohort;
  const c3 = await students(lastYear.id, world.course.id, 12, 'c');
  await seedSubmissions({ practicalId: old.id, cohortId: lastYear.id, studentIds: c3, markerIds: [world.people.ta.id], seed: 3 });
});

/** The counted rows of a cohort, read back through the models and filtered in plain JS. */
async function countedSubmissions(cohortId: number) {
  const { Submission } = models();
  const all = await Submission.findAll({ where: { practicalId, cohortId } });
  return all.filter((s) => s.status !== 'draft' && s.submittedAt && s.isMarkedAttempt);
}

describe('statistics API against simple-statistics on the same rows', () => {
  let report: PracticalReport;
  beforeAll(async () => {
    const res = await stats(world.people.lead.id, `?cohortId=${world.cohort.id}`);
    expect(res.status).toBe(200);
    report = await res.json();
  });

  it('counts submitted, on time, late, marked and released', async () => {
    const subs = await countedSubmissions(world.cohort.id);
    expect(report.counts).toEqual({
      students: new Set(subs.map((s) => s.studentId)).size,
      submitted: subs.length,
      onTime: subs.filter((s) => s.daysLate === 0).length,
      late: subs.filter((s) => s.daysLate > 0).length,
      marked: subs.filter((s) => s.status === 'marked' || s.status === 'released').length,
      released: subs.filter((s) => s.releasedAt !== null).length,
    });
    expect(report.counts.submitted).toBe(28); // superseded attempts are not counted
    expect(report.suppressed).toBe(false);
  });

  it('per quantity and basis: min, quartiles (R type 7, simple-statistics quantileSorted), median, max, mean, population SD, shares, histogram', async () => {
    const { CheckResult } = models();
    const ids = (await countedSubmissions(world.cohort.id)).map((s) => s.id);
    const rows = await CheckResult.findAll({ where: { submissionId: ids } });
    expect(report.quantities).toHaveLength(SEED_QUANTITIES.length * 2);
    for (const q of report.quantities) {
      const mine = rows.filter((r) => r.key === q.key && r.species === q.species && r.basis === q.basis);
      const xs = mine
        .filter((r) => r.verdict !== 'not-checked' && r.relativeDeviation !== null)
        .map((r) => r.relativeDeviation! * 100)
        .sort((a, b) => a - b);
      expect(q.n).toBe(mine.length);
      expect(q.checked).toBe(xs.length);
      expect(q.box!.min).toBeCloseTo(min(xs), 9);
      expect(q.box!.max).toBeCloseTo(max(xs), 9);
      expect(q.box!.q1).toBeCloseTo(quantileSorted(xs, 0.25), 9);
      expect(q.box!.median).toBeCloseTo(quantileSorted(xs, 0.5), 9);
      expect(q.box!.q3).toBeCloseTo(quantileSorted(xs, 0.75), 9);
      expect(q.mean!).toBeCloseTo(mean(xs), 8);
      expect(q.sd!).toBeCloseTo(standardDeviation(xs), 6);
      const within = mine.filter((r) => r.verdict === 'within').length;
      const judged = mine.filter((r) => ['within', 'partial', 'outside'].includes(r.verdict)).length;
      expect(q.verdicts!.within).toBe(within);
      expect(q.shares!.within).toBeCloseTo(within / judged, 12);
      const bucketOf = (x: number) => HISTOGRAM_EDGES_PERCENT.filter((e) => x >= e).length;
      for (const b of q.histogram!) expect(b.count).toBe(xs.filter((x) => bucketOf(x) === b.bucket).length);
      expect(q.histogram!.reduce((a, b) => a + b.count, 0)).toBe(xs.length);
    }
  });

  it('names the most frequent slips (titles from lib/grading SLIPS, unknown codes as the code) with an example submission', async () => {
    const { SlipFinding } = models();
    const ids = (await countedSubmissions(world.cohort.id)).map((s) => s.id);
    const findings = await SlipFinding.findAll({ where: { submissionId: ids } });
    const byCode = new Map<string, number>();
    for (const f of findings) byCode.set(f.code, (byCode.get(f.code) ?? 0) + 1);
    expect(report.slips.length).toBe(byCode.size);
    for (const s of report.slips) {
      expect(s.count).toBe(byCode.get(s.code));
      expect(s.title).toBe((SLIPS as Record<string, { title: string }>)[s.code]?.title ?? s.code);
      expect(findings.some((f) => f.submissionId === s.exampleSubmissionId && f.code === s.code)).toBe(true);
      expect(s.exampleHref).toBe(`/marking/${s.exampleSubmissionId}`);
      // Quantity names, not code keys ("Force constant k", not "forceConstant").
      const keys = [...new Set(findings.filter((f) => f.code === s.code).map((f) => f.key))];
      const names = keys.map((k) => (QUANTITIES as Record<string, { label: string } | undefined>)[k]?.label ?? k);
      expect([...s.quantities].sort()).toEqual([...new Set(names)].sort());
      for (const k of keys) if (k in QUANTITIES) expect(s.quantities).not.toContain(k);
      // The example names the student and the attempt, not "Submission n".
      const ex = (await models().Submission.findByPk(s.exampleSubmissionId))!;
      const who = (await models().User.findByPk(ex.studentId))!;
      expect(s.example).toBe(`${who.name}, attempt ${ex.attempt}`);
    }
    const counts = report.slips.map((s) => s.count);
    expect([...counts].sort((a, b) => b - a)).toEqual(counts);
  });

  it('marker consistency: mean and population SD of marks and of (awarded − proposed), overrides, moderation changes, flag', async () => {
    const { Mark, Moderation } = models();
    const subs = (await countedSubmissions(world.cohort.id)).filter(
      (s) => s.markedById && (s.status === 'marked' || s.status === 'released'),
    );
    const marks = await Mark.findAll({ where: { submissionId: subs.map((s) => s.id) } });
    const mods = await Moderation.findAll({ where: { submissionId: subs.map((s) => s.id) } });
    const { User } = models();
    for (const row of report.markers.rows) {
      const user = await User.findOne({ where: { name: row.label } });
      expect(user).not.toBeNull(); // the lead sees names
      const mine = subs.filter((s) => s.markedById === user!.id);
      const f = mine.map((s) => (100 * s.awardedTotal!) / s.maxTotal!);
      const d = mine.map((s) => (100 * (s.awardedTotal! - s.proposedTotal!)) / s.maxTotal!);
      expect(row.submissions).toBe(mine.length);
      expect(row.meanMark!).toBeCloseTo(mean(f), 8);
      expect(row.sdMark!).toBeCloseTo(standardDeviation(f), 6);
      expect(row.meanDifference!).toBeCloseTo(mean(d), 8);
      expect(row.sdDifference!).toBeCloseTo(standardDeviation(d), 6);
      const ids = new Set(mine.map((s) => s.id));
      expect(row.overrides).toBe(
        marks.filter((m) => ids.has(m.submissionId) && m.proposed !== null && m.awarded !== null && m.awarded !== m.proposed).length,
      );
      expect(row.moderationChanges).toBe(mods.filter((m) => m.markerId === user!.id && m.decision === 'changed').length);
      const others = subs.filter((s) => s.markedById !== user!.id).map((s) => (100 * s.awardedTotal!) / s.maxTotal!);
      expect(row.othersMean!).toBeCloseTo(mean(others), 8);
      expect(row.flagged).toBe(Math.abs(mean(f) - mean(others)) > 10);
    }
    // The first marker was seeded 3 marks (25 points of 12) more lenient: flagged at 10 points, not at 60.
    const lenient = report.markers.rows.find((r) => r.label === world.people.ta.name)!;
    expect(lenient.flagged).toBe(true);
    const loose: PracticalReport = await (await stats(world.people.lead.id, `?cohortId=${world.cohort.id}&threshold=60`)).json();
    expect(loose.markers.rows.every((r) => !r.flagged)).toBe(true);
  });
});

describe('privacy and scoping', () => {
  it('401 for anonymous, 403 for a student, a lead of another course and a TA of another cohort', async () => {
    expect((await stats(null, `?cohortId=${world.cohort.id}`)).status).toBe(401);
    expect((await stats(world.people.student.id, `?cohortId=${world.cohort.id}`)).status).toBe(403);
    expect((await stats(world.people.otherLead.id)).status).toBe(403);
    expect((await stats(world.people.otherTa.id, `?cohortId=${world.cohort.id}`)).status).toBe(403);
    expect((await stats(world.people.ta.id)).status).toBe(403); // a TA must name a cohort they mark
    expect((await stats(world.people.instructor.id)).status).toBe(200);
  });

  it('404 for a practical that does not exist or a cohort of another course; 400 for a bad threshold', async () => {
    const res = await getStats(
      await apiRequest('/api/statistics/practicals/999999', { as: world.people.lead.id }),
      params({ id: '999999' }),
    );
    expect(res.status).toBe(404);
    expect((await stats(world.people.lead.id, `?cohortId=${world.foreignCohort.id}`)).status).toBe(404);
    expect((await stats(world.people.lead.id, `?cohortId=abc`)).status).toBe(400);
    expect((await stats(world.people.lead.id, `?threshold=500`)).status).toBe(400);
  });

  it('a TA sees their cohort with other markers as "Marker n" and their own row named', async () => {
    const res = await stats(world.people.ta.id, `?cohortId=${world.cohort.id}`);
    expect(res.status).toBe(200);
    const body: PracticalReport = await res.json();
    expect(body.markers.namesShown).toBe(false);
    const text = JSON.stringify(body);
    expect(text).not.toContain(world.people.otherTa.name);
    expect(text).not.toContain(world.people.instructor.name);
    expect(body.markers.rows.find((r) => r.own)!.label).toContain(world.people.ta.name);
    expect(
      body.markers.rows
        .filter((r) => !r.own)
        .map((r) => r.label)
        .sort(),
    ).toEqual(['Marker 1', 'Marker 2']);
  });

  it('a group of fewer than five students shows counts only', async () => {
    const body: PracticalReport = await (await stats(world.people.lead.id, `?cohortId=${world.otherCohort.id}`)).json();
    expect(body.counts.students).toBe(4);
    expect(body.suppressed).toBe(true);
    for (const q of body.quantities) {
      expect(q.suppressed).toBe(true);
      expect(q.box).toBeUndefined();
      expect(q.shares).toBeUndefined();
      expect(q.histogram).toBeUndefined();
    }
    for (const m of body.markers.rows) expect(m.meanMark).toBeNull();
  });
});

describe('across cohorts and years', () => {
  it('puts cohorts of practicals with the same title side by side, this year and last', async () => {
    const res = await getCompare(
      await apiRequest(`/api/statistics/practicals/${practicalId}/compare`, { as: world.people.lead.id }),
      params({ id: String(practicalId) }),
    );
    expect(res.status).toBe(200);
    const body: Comparison = await res.json();
    expect(body.practicalIds).toHaveLength(2);
    const labels = body.groups.map((g) => g.label);
    expect(labels).toEqual(['Cohort 1, 2025 Autumn', 'Cohort 1, 2026 Autumn', 'Cohort 2, 2026 Autumn']);
    const last = body.groups.find((g) => g.group === String(lastYearCohortId))!;
    expect(last.counts.submitted).toBe(12);
    const { Submission } = models();
    const lastSubs = (await Submission.findAll({ where: { cohortId: lastYearCohortId } })).filter(
      (s) => s.isMarkedAttempt && (s.status === 'marked' || s.status === 'released'),
    );
    expect(last.meanMark!).toBeCloseTo(mean(lastSubs.map((s) => (100 * s.awardedTotal!) / s.maxTotal!)), 8); // simple-statistics mean
    expect(body.groups.find((g) => g.label.startsWith('Cohort 2'))!.suppressed).toBe(true);
    const byInstrument: Comparison = await (
      await getCompare(
        await apiRequest(`/api/statistics/practicals/${practicalId}/compare?by=instrument`, { as: world.people.lead.id }),
        params({ id: String(practicalId) }),
      )
    ).json();
    expect(byInstrument.groups.map((g) => g.label).sort()).toEqual(['Bench 1', 'Bench 2']);
    expect(byInstrument.groups.find((g) => g.label === 'Bench 1')!.counts.submitted).toBe(28 + 12);
  });

  it('a TA compares only the cohorts they mark', async () => {
    const body: Comparison = await (
      await getCompare(
        await apiRequest(`/api/statistics/practicals/${practicalId}/compare`, { as: world.people.otherTa.id }),
        params({ id: String(practicalId) }),
      )
    ).json();
    expect(body.groups.map((g) => g.group)).toEqual([String(world.otherCohort.id)]);
    const student = await getCompare(
      await apiRequest(`/api/statistics/practicals/${practicalId}/compare`, { as: world.people.student.id }),
      params({ id: String(practicalId) }),
    );
    expect(student.status).toBe(403);
  });
});

describe('exports', () => {
  it('marks CSV round-trips through papaparse with the documented header, one row per student, formula cells neutralised', async () => {
    const res = await getMarksCsv(
      await apiRequest(`/api/statistics/practicals/${practicalId}/export/marks?cohortId=${world.cohort.id}`, { as: world.people.lead.id }),
      params({ id: String(practicalId) }),
    );
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toContain('text/csv');
    const parsed = Papa.parse<Record<string, string>>(await res.text(), { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    const header = [
      ...MARKS_CSV_LEADING,
      ...SEED_QUANTITIES.map((q) => `mark_${q.key}_${q.species}`),
      'mark_report',
      ...MARKS_CSV_TRAILING,
    ];
    expect(parsed.meta.fields).toEqual(header);
    expect(parsed.data).toHaveLength(30); // the whole roster of cohort 1, with or without a submission
    const subs = await countedSubmissions(world.cohort.id);
    const { User, Mark } = models();
    for (const s of subs) {
      const u = (await User.findByPk(s.studentId))!;
      const row = parsed.data.find((r) => r.email === u.email)!;
      expect(row.total).toBe(s.awardedTotal === null ? '' : String(s.awardedTotal));
      expect(row.status).toBe(s.status);
      expect(row.attempt).toBe(String(s.attempt));
      const fc = await Mark.findOne({ where: { submissionId: s.id, itemKey: 'forceConstant:H35Cl' } });
      expect(row.mark_forceConstant_H35Cl).toBe(fc?.awarded == null ? '' : String(fc.awarded));
    }
    expect(parsed.data.filter((r) => r.status === 'not-submitted')).toHaveLength(2);
    const formula = parsed.data.find((r) => r.name.includes('HYPERLINK'))!;
    expect(formula.name.startsWith("'=")).toBe(true);
  });

  it('marks CSV is for leads and instructors only', async () => {
    const res = await getMarksCsv(
      await apiRequest(`/api/statistics/practicals/${practicalId}/export/marks?cohortId=${world.cohort.id}`, { as: world.people.ta.id }),
      params({ id: String(practicalId) }),
    );
    expect(res.status).toBe(403);
  });

  it('statistics CSV has the documented header and the API figures', async () => {
    const report: PracticalReport = await (await stats(world.people.lead.id, `?cohortId=${world.cohort.id}`)).json();
    const res = await getStatsCsv(
      await apiRequest(`/api/statistics/practicals/${practicalId}/export/statistics?cohortId=${world.cohort.id}`, {
        as: world.people.ta.id,
      }),
      params({ id: String(practicalId) }),
    );
    expect(res.status).toBe(200);
    const parsed = Papa.parse<Record<string, string>>(await res.text(), { header: true, skipEmptyLines: true });
    expect(parsed.meta.fields).toEqual([...STATS_CSV_HEADER]);
    expect(parsed.data).toHaveLength(report.quantities.length);
    const q = report.quantities[0];
    const row = parsed.data.find((r) => r.quantity === q.key && r.basis === q.basis)!;
    expect(Number(row.median_percent)).toBeCloseTo(q.box!.median, 3);
    expect(Number(row.n)).toBe(q.n);
  });

  it('PDF summary: every quantity and every listed slip on page 1, by name; histograms after', async () => {
    const report: PracticalReport = await (await stats(world.people.lead.id, `?cohortId=${world.cohort.id}`)).json();
    const res = await getPdf(
      await apiRequest(`/api/statistics/practicals/${practicalId}/export/summary?cohortId=${world.cohort.id}`, {
        as: world.people.lead.id,
      }),
      params({ id: String(practicalId) }),
    );
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/pdf');
    const bytes = new Uint8Array(await res.arrayBuffer());
    const pdf = await PDFDocument.load(bytes);
    expect(pdf.getPageCount()).toBe(2);
    expect(pdf.getTitle()).toContain('HCl fundamental band');
    const page1 = pdfPageText(bytes, 1);
    for (const q of report.quantities.filter((x) => x.box))
      expect(page1).toContain((QUANTITIES as Record<string, { label: string } | undefined>)[q.key]?.label ?? q.key);
    for (const sl of report.slips) {
      expect(page1).toContain(sl.title.split(' ').slice(0, 3).join(' '));
      expect(page1).toContain(sl.example.split(',')[0]);
    }
  });
});
