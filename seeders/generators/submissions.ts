/**
 * Demo submissions for CHEM2041 "HCl/DCl fundamental band": fictional students' attempts made
 * from line lists simulated from published constants (simulateLineList) with small seeded noise,
 * some correct and some with one named slip each, a few late, some with a generated spectrum
 * (synthesizeSpectrum + toJcampDx). student01 and student21 are left without submissions (the
 * browser test uses them). Idempotent: a student who already has an attempt is skipped.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import { models } from '@/models';
import { uploadPath } from '@/lib/storage';
import { mulberry32, gaussian, isotopologuesOf, predictBand, synthesizeSpectrum, toJcampDx } from '@/lib/spectrum';
import { checkStoredSubmission } from '@/lib/submissions/check';
import { noisyLineList, reportedValues, type DemoLine, type DemoSlip, type DemoValue } from './report';
import { createDemoAttempt } from './attempt';

const SLIP_PLAN: readonly DemoSlip[] = [
  'correct',
  'mass-numbers-used',
  'missing-2pi',
  'correct',
  'grams-not-kilograms',
  'r0-reported-as-re',
  'b0-b1-swapped',
  'unit-mismatch',
  'correct',
  'correct',
];
const SKIP = new Set([1, 21, 15, 35]);

/**
 * The lines a real cell shows beside the student's: the same molecule's less abundant
 * isotopologues (H³⁷Cl beside H³⁵Cl) at their predicted positions, for the same branches and J,
 * weighted by natural abundance relative to the major isotopologue (as predictBand predicts both).
 */
function partnerLines(lines: readonly DemoLine[]): DemoLine[] {
  const out: DemoLine[] = [];
  for (const species of new Set(lines.map((l) => l.species))) {
    const own = lines.filter((l) => l.species === species);
    const strongest = Math.max(...own.map((l) => l.intensity));
    const family = isotopologuesOf(species.replace(/\d+/g, ''));
    if (!family.ok) continue;
    const major = family.isotopologues.find((iso) => iso.rank === 0);
    const majorStrongest = Math.max(...(major ? (predictBand(major, 'fundamental')?.lines ?? []) : []).map((l) => l.intensity));
    if (!(majorStrongest > 0)) continue;
    for (const iso of family.isotopologues) {
      if (iso.rank === 0 || iso.formula === species) continue;
      const band = predictBand(iso, 'fundamental');
      for (const l of band?.lines ?? []) {
        if (!own.some((o) => o.branch === l.branch && o.J === l.J)) continue;
        out.push({
          species: iso.formula,
          branch: l.branch,
          J: l.J,
          wavenumber: l.wavenumber,
          intensity: (l.intensity / majorStrongest) * strongest,
        });
      }
    }
  }
  return out;
}

export async function seedDemoSubmissions(): Promise<{ created: number; skipped: string | null }> {
  const { Course, Practical, Cohort, User, Submission, Upload, PracticalCohort } = models();
  const course = await Course.findOne({ where: { code: 'CHEM2041' } });
  if (!course) return { created: 0, skipped: 'CHEM2041 not seeded' };
  const practical = await Practical.findOne({ where: { courseId: course.id, title: 'HCl/DCl fundamental band' } });
  if (!practical) return { created: 0, skipped: 'demo practicals not seeded' };
  const cohorts = await Cohort.findAll({ where: { courseId: course.id } });
  let created = 0;
  for (let n = 1; n <= 40; n++) {
    if (SKIP.has(n)) continue;
    const email = `student${String(n).padStart(2, '0')}@northmere.example`;
    const student = await User.findOne({ where: { email } });
    if (!student) continue;
    if (await Submission.findOne({ where: { practicalId: practical.id, studentId: student.id, attempt: 1 } })) continue;
    const cohort = cohorts.find((c) => c.name === (n <= 20 ? 'Group A' : 'Group B'));
    if (!cohort) continue;
    const pc = await PracticalCohort.findOne({ where: { practicalId: practical.id, cohortId: cohort.id } });
    if (!pc) continue;
    const rand = mulberry32(1000 + n);
    const noise = gaussian(rand);
    const plan = SLIP_PLAN[n % SLIP_PLAN.length];
    const late = n % 9 === 0 ? 1 + (n % 2) : 0;
    const values: DemoValue[] = [];
    const allLines: DemoLine[] = [];
    for (const sp of practical.species) {
      const lines = noisyLineList(sp, 0.03, noise);
      allLines.push(...lines);
      values.push(...(reportedValues(sp, lines, plan) ?? []));
    }
    const sub = await createDemoAttempt({
      practical,
      cohortId: cohort.id,
      studentId: student.id,
      submittedAt: new Date(Date.now() - (40 - n) * 3600_000),
      daysLate: late,
      values,
      lines: allLines,
    });
    if (n % 3 !== 0) {
      const spectrum = synthesizeSpectrum({
        lines: [...allLines, ...partnerLines(allLines)].map((l) => ({ wavenumber: l.wavenumber, intensity: l.intensity })),
        from: 1950,
        to: 3150,
        step: 0.25,
        fwhm: 0.8,
        noise: 0.003,
        seed: 500 + n,
        title: `SYNTHETIC demo spectrum, student ${n}`,
      });
      const text = toJcampDx(spectrum, {
        title: `SYNTHETIC HCl/DCl demo spectrum ${n} (not a measurement)`,
        origin: 'Oscillab demo seeder',
        owner: 'Public domain (synthetic data)',
      });
      const storedName = `${crypto.randomBytes(16).toString('hex')}.jdx`;
      fs.writeFileSync(uploadPath(storedName), text);
      await Upload.create({
        ownerId: student.id,
        submissionId: sub.id,
        kind: 'spectrum',
        originalName: `hcl-dcl-bench-${n}.jdx`,
        storedName,
        sha256: crypto.createHash('sha256').update(text).digest('hex'),
        size: Buffer.byteLength(text),
        contentType: 'chemical/x-jcamp-dx',
      });
    }
    await checkStoredSubmission(sub.id);
    created++;
  }
  return { created, skipped: null };
}
