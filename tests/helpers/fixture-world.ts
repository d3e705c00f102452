/**
 * A richer world for the authorisation matrix and the bad-input barrage: buildWorld's people and
 * course, plus real rows every route can point at. Everything a student does goes through the
 * real route handlers and services (draft → uploads → submit, which runs checkStoredSubmission);
 * extra checked submissions for one-shot routes come from lib/marking/test-fixtures.ts, and
 * marking / release go through lib/marking.
 */
import fs from 'node:fs';
import path from 'node:path';
import { models } from '@/models';
import { buildWorld, type World } from './world';
import { apiRequest, params } from './session';
import { buildPractical, CONST, draftFor, kFrom, muU, SPECTRA_DIR } from '@/tests/fixtures/submissions/practical';
import { createCheckedSubmission, createFixturePractical } from '@/lib/marking/test-fixtures';
import { acceptProposal, saveMarks } from '@/lib/marking/marks';
import { releaseOne } from '@/lib/marking/release';
import { deliverOutbox } from '@/lib/mail/outbox';
import { emptyDraft } from '@/lib/schemas/submission';
import { PUT as saveDraftRoute } from '@/app/api/submissions/draft/route';
import { POST as submitRoute } from '@/app/api/submissions/[id]/submit/route';
import { POST as uploadRoute } from '@/app/api/uploads/route';

export const JCAMP = fs.readFileSync(path.join(SPECTRA_DIR, 'hcl-298k.jdx'));
/** A minimal well-formed PDF (header, one empty page, xref, trailer, %%EOF). */
export const PDF = Buffer.from(
  '%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[3 0 R]/Count 1>>endobj\n3 0 obj<</Type/Page/Parent 2 0 R/MediaBox[0 0 612 792]>>endobj\nxref\n0 4\n0000000000 65535 f \n0000000009 00000 n \n0000000052 00000 n \n0000000101 00000 n \ntrailer<</Size 4/Root 1 0 R>>\nstartxref\n170\n%%EOF\n',
);

/** A correct H³⁵Cl answer: μ from AME2020 masses, k = 4π²c²ν̃²μ with CODATA 2018 c (see fixtures/submissions/practical.ts). */
export function correctValues() {
  const nu = 2886.0;
  const mu = muU(CONST.mH, CONST.mCl35);
  return {
    bandCentre: { value: nu.toFixed(1), unit: 'cm-1', uncertainty: '0.5' },
    reducedMass: { value: mu.toFixed(6), unit: 'u' },
    forceConstant: { value: kFrom(nu, mu).toFixed(1), unit: 'N/m', uncertainty: '0.3' },
  };
}

async function ok(res: Response, what: string) {
  const body = await res.json();
  if (res.status >= 300) throw new Error(`${what}: ${res.status} ${JSON.stringify(body)}`);
  return body;
}

export async function uploadAs(studentId: number, submissionId: number, kind: 'spectrum' | 'report', name: string, bytes: Buffer) {
  const form = new FormData();
  form.set('submissionId', String(submissionId));
  form.set('kind', kind);
  form.set('file', new Blob([new Uint8Array(bytes)]), name);
  return uploadRoute(await apiRequest('/api/uploads', { as: studentId, method: 'POST', rawBody: form }), {});
}

export type FixtureWorld = Awaited<ReturnType<typeof buildFixtureWorld>>;

export async function buildFixtureWorld() {
  const world = await buildWorld();
  const { people, course, cohort } = world;
  const { Submission, Upload, Practical, ToleranceBand, QuantityDefinition } = models();

  // Practical A (both cohorts, quantities and bands): `student` drafts, uploads a spectrum and a
  // report, and submits; submit runs checkStoredSubmission in its transaction.
  const { practical, defs } = await buildPractical(world);
  const draft = { ...draftFor('H35Cl', correctValues()) };
  const saved = await ok(
    await saveDraftRoute(
      await apiRequest('/api/submissions/draft', { as: people.student.id, method: 'PUT', body: { practicalId: practical.id, draft } }),
      {},
    ),
    'save draft',
  );
  const spectrum = await ok(await uploadAs(people.student.id, saved.id, 'spectrum', 'hcl.jdx', JCAMP), 'upload spectrum');
  const report = await ok(await uploadAs(people.student.id, saved.id, 'report', 'report.pdf', PDF), 'upload report');
  const toSubmit = { ...draft, spectrumUploadId: spectrum.id, reportUploadId: report.id };
  const submitted = await ok(
    await submitRoute(
      await apiRequest(`/api/submissions/${saved.id}/submit`, {
        as: people.student.id,
        body: { version: report.version, draft: toSubmit },
      }),
      params({ id: String(saved.id) }),
    ),
    'submit',
  );
  const submission = (await Submission.findByPk(submitted.result.id))!;
  const spectrumUpload = (await Upload.findOne({ where: { submissionId: submission.id, kind: 'spectrum' } }))!;

  // Practical B (both cohorts): a filled-in draft of `student`, still to be submitted.
  const practicalB = (await buildPractical(world)).practical;
  const draftB = { ...draftFor('H35Cl', correctValues()) };
  const savedB = await ok(
    await saveDraftRoute(
      await apiRequest('/api/submissions/draft', {
        as: people.student.id,
        method: 'PUT',
        body: { practicalId: practicalB.id, draft: draftB },
      }),
      {},
    ),
    'save draft B',
  );

  // Practical C (only `student`'s cohort): drafts and uploads of `otherStudent` are not allowed here.
  const practicalC = await createFixturePractical(course.id, [cohort.id]);
  const savedC = await ok(
    await saveDraftRoute(
      await apiRequest('/api/submissions/draft', {
        as: people.student.id,
        method: 'PUT',
        body: { practicalId: practicalC.id, draft: emptyDraft(practicalC.species) },
      }),
      {},
    ),
    'save draft C',
  );

  // A released attempt of `student` (feedback PDF exists); its e-mail is sent now, so no queued
  // mail is left for a later background outbox run to pick up.
  const released = await freshSubmission(world, 'released');
  await deliverOutbox();

  // A practical without submissions, for quantity and band changes that must not touch checked work.
  const setup = (await buildPractical(world)).practical;
  await models().PracticalCohort.destroy({ where: { practicalId: setup.id } });
  const setupQuantity = (await QuantityDefinition.findOne({ where: { practicalId: setup.id, key: 'bandCentre' } }))!;
  const setupBand = (await ToleranceBand.findOne({ where: { quantityDefinitionId: setupQuantity.id } }))!;

  return {
    ...world,
    practical: (await Practical.findByPk(practical.id))!,
    defs,
    submission,
    spectrumUpload,
    draftB: { id: savedB.id as number, practicalId: practicalB.id, draft: draftB },
    draftC: { id: savedC.id as number, practicalId: practicalC.id },
    released,
    setup,
    setupQuantity,
    setupBand,
  };
}

/**
 * A new checked attempt of `student` in the cohort, on a practical of its own (attempt numbers
 * are unique per practical): 'submitted', 'marked' (every item marked by the TA) or 'released'.
 */
export async function freshSubmission(world: World, state: 'submitted' | 'marked' | 'released' = 'submitted') {
  const practical = await createFixturePractical(world.course.id, [world.cohort.id]);
  let sub = await createCheckedSubmission({ practicalId: practical.id, cohortId: world.cohort.id, studentId: world.people.student.id });
  if (state !== 'submitted') {
    const r = await acceptProposal(world.people.ta.id, sub.id, sub.version);
    await saveMarks(world.people.ta.id, sub.id, { version: r.version, items: [{ itemKey: 'rubric:discussion', awarded: 1 }] });
  }
  if (state === 'released') {
    const out = await releaseOne(world.people.instructor.id, sub.id);
    if (!out.ok) throw new Error(`release: ${out.message}`);
  }
  sub = (await models().Submission.findByPk(sub.id))!;
  return sub;
}
