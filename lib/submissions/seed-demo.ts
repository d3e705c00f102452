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
import { fitBandModels, forceConstantFromBand, u as ATOMIC_MASS_KG, bondLengthFromB, parseSpecies, simulateLineList } from '@/lib/grading';
import { mulberry32, gaussian, synthesizeSpectrum, toJcampDx } from '@/lib/spectrum';
import { checkStoredSubmission } from './check';

const SLIP_PLAN = ['correct', 'mass-numbers-used', 'missing-2pi', 'correct', 'grams-not-kilograms', 'r0-reported-as-re', 'b0-b1-swapped', 'unit-mismatch', 'correct', 'correct'] as const;
const SKIP = new Set([1, 21, 15, 35]);

export async function seedDemoSubmissions(): Promise<{ created: number; skipped: string | null }> {
  const { Course, Practical, Cohort, User, Submission, SubmittedValue, LineAssignment, Upload, PracticalCohort } = models();
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
    const sub = await Submission.create({
      practicalId: practical.id, cohortId: cohort.id, studentId: student.id, attempt: 1, status: 'submitted', draft: null,
      submittedAt: new Date(Date.now() - (40 - n) * 3600_000), daysLate: late, latePenalty: late ? Math.min(practical.latePenaltyCap, practical.latePenaltyPerDay * late) : 0,
      flagLate: late > 0, isMarkedAttempt: true, checkSummary: null, lineListHash: null, proposedTotal: null, awardedTotal: null, maxTotal: null,
      markedById: null, markedAt: null, releasedAt: null, resubmissionMessage: null, version: 0,
    });
    const values: { key: string; species: string; valueText: string; unit: string; uncertaintyText: string | null }[] = [];
    const allLines: { species: string; branch: 'P' | 'R'; J: number; wavenumber: number; intensity: number }[] = [];
    for (const sp of practical.species) {
      const species = parseSpecies(sp);
      if (!species.ok) continue;
      const sim = simulateLineList(sp, { jMax: 9 });
      const lines = sim.map((l) => ({ species: sp, branch: l.branch, J: l.J, wavenumber: Math.round((l.wavenumber + 0.03 * noise()) * 100) / 100, intensity: l.intensity }));
      allLines.push(...lines);
      // The model the lines support (with −4Dm³ where they need it), as a careful student fits.
      const models = fitBandModels(lines);
      if (!models.ok) continue;
      const fit = models.fit;
      const nu0 = Math.round(fit.nu0.value * 10) / 10;
      const muKg = species.species.reducedMassKg;
      const muU = species.species.reducedMassU;
      let k = forceConstantFromBand(nu0 * 100, muKg);
      let kUnit = 'N m-1';
      let kMu = muU;
      if (sp === 'H35Cl') {
        if (plan === 'mass-numbers-used') { kMu = 35 / 36; k = forceConstantFromBand(nu0 * 100, kMu * ATOMIC_MASS_KG); }
        if (plan === 'missing-2pi') k /= 4 * Math.PI ** 2;
        if (plan === 'grams-not-kilograms') k *= 1000;
        if (plan === 'unit-mismatch') kUnit = 'mdyn/Å';
      }
      let B0 = fit.B0.value;
      let B1 = fit.B1.value;
      if (sp === 'H35Cl' && plan === 'b0-b1-swapped') [B0, B1] = [B1, B0];
      const re = plan === 'r0-reported-as-re' ? bondLengthFromB(fit.B0.value * 100, muKg) : bondLengthFromB(fit.Be.value * 100, muKg);
      const put = (key: string, valueText: string, unit: string, unc: string | null) => values.push({ key, species: sp, valueText, unit, uncertaintyText: unc });
      put('bandCentre', nu0.toFixed(1), 'cm-1', '0.3');
      put('reducedMass', kMu.toFixed(5), 'u', null);
      put('forceConstant', k.toPrecision(4), kUnit, (k * 0.002).toPrecision(1));
      put('B0', B0.toFixed(3), 'cm-1', '0.005');
      put('B1', B1.toFixed(3), 'cm-1', '0.005');
      put('Be', ((3 * B0 - B1) / 2).toFixed(3), 'cm-1', null);
      put('alphaE', (B0 - B1).toFixed(3), 'cm-1', null);
      put('re', (re * 1e10).toFixed(4), 'Å', '0.0005');
    }
    await SubmittedValue.bulkCreate(values.map((v) => ({ ...v, submissionId: sub.id, valueSI: null })));
    await LineAssignment.bulkCreate(allLines.map((l) => ({ submissionId: sub.id, species: l.species, branch: l.branch, J: l.J, wavenumber: l.wavenumber, source: 'student' as const })));
    if (n % 3 !== 0) {
      const spectrum = synthesizeSpectrum({ lines: allLines.map((l) => ({ wavenumber: l.wavenumber, intensity: l.intensity })), from: 1950, to: 3150, step: 0.25, fwhm: 0.8, noise: 0.003, seed: 500 + n, title: `SYNTHETIC demo spectrum, student ${n}` });
      const text = toJcampDx(spectrum, { title: `SYNTHETIC HCl/DCl demo spectrum ${n} (not a measurement)`, origin: 'Oscillab demo seeder', owner: 'Public domain (synthetic data)' });
      const storedName = `${crypto.randomBytes(16).toString('hex')}.jdx`;
      fs.writeFileSync(uploadPath(storedName), text);
      await Upload.create({ ownerId: student.id, submissionId: sub.id, kind: 'spectrum', originalName: `hcl-dcl-bench-${n}.jdx`, storedName, sha256: crypto.createHash('sha256').update(text).digest('hex'), size: Buffer.byteLength(text), contentType: 'chemical/x-jcamp-dx' });
    }
    await checkStoredSubmission(sub.id);
    created++;
  }
  return { created, skipped: null };
}
