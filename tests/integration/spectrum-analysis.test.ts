/**
 * Oscillab's own analysis of a student's spectrum in the product: analysed on upload, the lines
 * taken into the form, the student's lines counted per isotopologue and band (a band outside the
 * uploaded range said plainly), one spectrum per sample, the instructor's switch for the third
 * comparison and its verdicts on the marking view and in the feedback input.
 *
 * Spectra and line positions come from the Huber & Herzberg constants (NIST WebBook, from memory;
 * shared reference table) through the published term formulas in tests/helpers/diatomic-lines.ts.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { models } from '@/models';
import { buildWorld, type World } from '@/tests/helpers/world';
import { apiRequest, params } from '@/tests/helpers/session';
import { PUT as saveDraftRoute } from '@/app/api/submissions/draft/route';
import { POST as uploadRoute } from '@/app/api/uploads/route';
import { GET as spectrumRoute } from '@/app/api/submissions/[id]/spectrum/route';
import { GET as linesRoute } from '@/app/api/submissions/[id]/spectrum-lines/route';
import { POST as submitRoute } from '@/app/api/submissions/[id]/submit/route';
import { GET as getSettings, PUT as putSettings } from '@/app/api/practicals/[practicalId]/spectrum-settings/route';
import { buildPractical } from '@/tests/fixtures/submissions/practical';
import { toJcampDx } from '@/lib/spectrum/jcamp-write';
import { loadMarkingView } from '@/lib/marking/view';
import { feedbackInputFromView } from '@/lib/marking/feedback-input';
import { buildFeedbackPdf } from '@/lib/pdf/feedback';
import type { CheckSummary } from '@/lib/submissions/check';
import type { SpectrumFigureAnswer } from '@/lib/submissions/spectrum-figure';
import { bandLines, expectedBand, record, type Line } from '../helpers/diatomic-lines';

let world: World;

const hcl = [...bandLines('H35Cl', 1), ...bandLines('H37Cl', 1)];
const dcl = [...bandLines('D35Cl', 1), ...bandLines('D37Cl', 1)];

function jcamp(lines: Line[], from: number, to: number, title: string): Buffer {
  const s = record({ lines, from, to, step: 0.25, resolution: 0.5, noise: 5e-4, seed: 9, baselineSlope: 1e-5 });
  return Buffer.from(toJcampDx(s, { title: `SYNTHETIC ${title}`, notes: ['SYNTHETIC test spectrum, not a measurement.'] }));
}

/** A student's line list: the isotopologue's lines of J ≤ 9, rounded to 0.01 cm⁻¹ as read from a peak table. */
const studentLines = (lines: Line[], species: string) =>
  lines
    .filter((l) => l.species === species && l.J <= 9)
    .map((l) => ({ branch: l.branch, J: l.J, wavenumber: Math.round(l.wavenumber * 100) / 100 }));

function draft(
  lines: Record<string, { branch: 'P' | 'R'; J: number; wavenumber: number }[]>,
  values: Record<string, Record<string, { value: string; unit: string; uncertainty?: string }>> = {},
) {
  return {
    species: Object.fromEntries(
      Object.entries(lines).map(([sp, l]) => [
        sp,
        {
          lineText: '',
          lines: l,
          bandCentre: { value: '', unit: 'cm-1', uncertainty: '' },
          values: Object.fromEntries(Object.entries(values[sp] ?? {}).map(([k, v]) => [k, { uncertainty: '', ...v }])),
        },
      ]),
    ),
    spectrumUploadId: null,
    reportUploadId: null,
  };
}

async function newDraft(practicalId: number, body: ReturnType<typeof draft>) {
  const res = await saveDraftRoute(
    await apiRequest('/api/submissions/draft', { as: world.people.student.id, method: 'PUT', body: { practicalId, draft: body } }),
    {},
  );
  expect(res.status).toBe(200);
  return (await res.json()).id as number;
}

async function send(draftId: number, name: string, bytes: Buffer, sample?: string) {
  const form = new FormData();
  form.set('submissionId', String(draftId));
  form.set('kind', 'spectrum');
  if (sample) form.set('sample', sample);
  form.set('file', new Blob([new Uint8Array(bytes)]), name);
  const res = await uploadRoute(await apiRequest('/api/uploads', { as: world.people.student.id, method: 'POST', rawBody: form }), {});
  return { status: res.status, body: await res.json() };
}

const figure = async (id: number, sample?: string) => {
  const url = `/api/submissions/${id}/spectrum${sample ? `?sample=${sample}` : ''}`;
  const res = await spectrumRoute(await apiRequest(url, { as: world.people.student.id }), params({ id: String(id) }));
  return { status: res.status, body: await res.json() };
};

beforeAll(async () => {
  world = await buildWorld();
});

describe('one spectrum holding two bands (HCl and DCl in one cell)', () => {
  let practicalId: number;
  let draftId: number;
  const both = jcamp([...hcl, ...dcl], 1900, 3200, 'HCl + DCl cell');

  beforeAll(async () => {
    practicalId = (await buildPractical(world, { species: ['H35Cl', 'D35Cl'] })).practical.id;
    draftId = await newDraft(practicalId, draft({ H35Cl: studentLines(hcl, 'H35Cl'), D35Cl: studentLines(dcl, 'D35Cl') }));
  });

  it('analyses the spectrum on upload and keeps the analysis with it', async () => {
    const r = await send(draftId, 'cell.jdx', both);
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    expect(r.body.sample).toBe('cell');
    const row = await models().Upload.findByPk(r.body.id);
    const a = row!.analysis as { ok: boolean; results: { isotopologue: string; band: string; status: string }[] };
    expect(a.ok).toBe(true);
    const fitted = a.results
      .filter((b) => b.status === 'fitted')
      .map((b) => `${b.isotopologue} ${b.band}`)
      .sort();
    expect(fitted).toEqual(['D35Cl fundamental', 'D37Cl fundamental', 'H35Cl fundamental', 'H37Cl fundamental']);
  });

  it('counts the student’s lines per isotopologue and band, and names what it found', async () => {
    const f = await figure(draftId);
    expect(f.status).toBe(200);
    const messages = f.body.perBand.map((b: { message: string }) => b.message);
    expect(messages).toContain('H³⁵Cl fundamental (1←0): 19 of 19 of your lines match a peak of your spectrum (within ±0.33 cm⁻¹).');
    expect(messages.some((m: string) => /^D³⁵Cl fundamental \(1←0\): 19 of 19 of your lines match/.test(m))).toBe(true);
    expect(f.body.bands.some((b: string) => /^H³⁵Cl fundamental \(1←0\): \d+ lines found and assigned\.$/.test(b))).toBe(true);
    expect(f.body.bands.some((b: string) => /^D³⁷Cl fundamental \(1←0\): \d+ lines found and assigned\.$/.test(b))).toBe(true);
  });

  it('answers the plot model the screen draws: one marker per student line, a curve, a title naming the file', async () => {
    const f = await figure(draftId);
    expect(f.status).toBe(200);
    expect(f.body.svg).toBeUndefined();
    const { model, title, idPrefix } = f.body.plot as SpectrumFigureAnswer['plot'];
    expect(title).toBe('Spectrum cell.jdx with your 38 lines');
    expect(idPrefix).toBe(`spec-${draftId}`);
    expect(model.kind).toBe('band');
    expect(model.curve.length).toBeGreaterThan(100);
    const lines = model.markers.filter((m) => m.group === 'P' || m.group === 'R');
    expect(lines).toHaveLength(38); // 19 + 19 lines of J ≤ 9 sent above
    expect(lines.every((m) => m.fill === 'solid')).toBe(true); // every line lies on a synthetic peak
    expect(model.description).toBe(f.body.description);
  });

  it('gives the lines it assigned, per isotopologue, for the student to take into the form', async () => {
    const res = await linesRoute(
      await apiRequest(`/api/submissions/${draftId}/spectrum-lines`, { as: world.people.student.id }),
      params({ id: String(draftId) }),
    );
    expect(res.status).toBe(200);
    const body = await res.json();
    for (const [sp, truth] of [
      ['H35Cl', hcl],
      ['D35Cl', dcl],
    ] as const) {
      const got = body.species[sp];
      expect(got.count).toBeGreaterThanOrEqual(18);
      expect(got.text.split('\n')[0]).toBe('branch,J,wavenumber (cm-1)');
      for (const l of got.lines) {
        const t = truth.find((x) => x.species === sp && x.branch === l.branch && x.J === l.J)!;
        expect(Math.abs(l.wavenumber - t.wavenumber), `${sp} ${l.branch}(${l.J})`).toBeLessThan(0.05);
      }
    }
    // Not for anyone else, and not into a submitted attempt.
    const other = await linesRoute(
      await apiRequest(`/api/submissions/${draftId}/spectrum-lines`, { as: world.people.ta.id }),
      params({ id: String(draftId) }),
    );
    expect(other.status).toBe(403);
  });

  it('says plainly when a band lies outside the uploaded spectrum', async () => {
    const r = await send(draftId, 'hcl-only.jdx', jcamp(hcl, 2500, 3200, 'HCl only'));
    expect(r.status).toBe(201);
    const f = await figure(draftId);
    const d = f.body.perBand.find((b: { label: string }) => b.label.startsWith('D³⁵Cl'));
    expect(d.outsideRange).toBe(true);
    expect(d.message).toBe(
      'D³⁵Cl fundamental (1←0): your 19 lines lie near 2091 cm⁻¹, outside the spectrum you uploaded (2500–3200 cm⁻¹); upload the spectrum that holds this band.',
    );
    // The replaced file is gone with its row.
    expect(await models().Upload.count({ where: { submissionId: draftId, kind: 'spectrum' } })).toBe(1);
  });

  it('refuses a sample the practical does not take, keeping nothing', async () => {
    const before = await models().Upload.count();
    const r = await send(draftId, 'x.jdx', both, 'nitrogen');
    expect(r.status).toBe(400);
    expect(r.body.error).toMatch(/takes no spectrum called "nitrogen"/);
    expect(await models().Upload.count()).toBe(before);
  });
});

describe('one spectrum per sample, and the third comparison', () => {
  let practicalId: number;
  let draftId: number;

  beforeAll(async () => {
    practicalId = (await buildPractical(world, { species: ['H35Cl', 'D35Cl'] })).practical.id;
  });

  it('lets the instructor say which spectra the practical takes, and refuses what cannot work', async () => {
    const put = async (body: unknown, as = world.people.instructor.id) =>
      putSettings(
        await apiRequest(`/api/practicals/${practicalId}/spectrum-settings`, { as, method: 'PUT', body }),
        params({ practicalId: String(practicalId) }),
      );
    const unknown = await put({
      spectrumAnalysis: true,
      samples: [{ key: 'a', label: 'A', molecules: ['HCl', 'XeQ'], bands: ['fundamental'] }],
    });
    expect(unknown.status).toBe(400);
    const missing = await put({
      spectrumAnalysis: true,
      samples: [{ key: 'hcl', label: 'HCl cell', molecules: ['HCl'], bands: ['fundamental'] }],
    });
    expect(missing.status).toBe(400);
    expect((await missing.json()).error).toMatch(/No spectrum holds DCl/);
    expect((await put({ spectrumAnalysis: true, samples: null }, world.people.ta.id)).status).toBe(403);
    const ok = await put({
      spectrumAnalysis: true,
      samples: [
        { key: 'hcl', label: 'HCl cell', molecules: ['HCl'], bands: ['fundamental'] },
        { key: 'dcl', label: 'DCl cell', molecules: ['DCl'], bands: ['fundamental'] },
      ],
    });
    expect(ok.status).toBe(200);
    const got = await (
      await getSettings(
        await apiRequest(`/api/practicals/${practicalId}/spectrum-settings`, { as: world.people.instructor.id }),
        params({ practicalId: String(practicalId) }),
      )
    ).json();
    expect(got.spectrumAnalysis).toBe(true);
    expect(got.effective.map((s: { key: string }) => s.key)).toEqual(['hcl', 'dcl']);
  });

  it('takes a spectrum per sample and checks the submission against both', async () => {
    // Correct H³⁵Cl numbers; a D³⁵Cl band centre read from a P branch numbered one line too far
    // (about 2B₀ ≈ 10.8 cm⁻¹ low): consistent with a wrong line list, not with the spectrum.
    const eH = expectedBand('H35Cl', 1);
    const eD = expectedBand('D35Cl', 1);
    draftId = await newDraft(
      practicalId,
      draft(
        { H35Cl: studentLines(hcl, 'H35Cl'), D35Cl: studentLines(dcl, 'D35Cl') },
        {
          H35Cl: {
            bandCentre: { value: eH.origin.toFixed(2), unit: 'cm-1', uncertainty: '0.05' },
            B0: { value: eH.B0.toFixed(3), unit: 'cm-1' },
          },
          D35Cl: { bandCentre: { value: (eD.origin - 2 * eD.B0).toFixed(2), unit: 'cm-1', uncertainty: '0.05' } },
        },
      ),
    );
    expect((await send(draftId, 'hcl.jdx', jcamp(hcl, 2500, 3200, 'HCl cell'), 'hcl')).status).toBe(201);
    expect((await send(draftId, 'dcl.jdx', jcamp(dcl, 1900, 2300, 'DCl cell'), 'dcl')).status).toBe(201);
    const saved = await models().Submission.findByPk(draftId);
    expect(Object.keys((saved!.draft as { spectra: Record<string, number> }).spectra)).toEqual(['dcl']);
    const f = await figure(draftId, 'dcl');
    expect(f.body.sample).toBe('dcl');
    expect(f.body.perBand.map((b: { label: string; outsideRange: boolean }) => [b.label, b.outsideRange])).toEqual([
      ['H³⁵Cl fundamental (1←0)', false],
      ['D³⁵Cl fundamental (1←0)', false],
    ]);

    const version = saved!.version;
    const res = await submitRoute(
      await apiRequest(`/api/submissions/${draftId}/submit`, {
        as: world.people.student.id,
        method: 'POST',
        body: { version, draft: saved!.draft },
      }),
      params({ id: String(draftId) }),
    );
    expect(res.status, JSON.stringify(await res.clone().json())).toBe(201);
    const attemptId = (await res.json()).id ?? (await models().Submission.findOne({ where: { practicalId, attempt: 1 } }))!.id;
    const uploads = await models().Upload.findAll({ where: { submissionId: attemptId, kind: 'spectrum' } });
    expect(uploads.map((u) => u.sample).sort()).toEqual(['dcl', 'hcl']);
    const attempt = await models().Submission.findByPk(attemptId);
    const summary = attempt!.checkSummary as CheckSummary;
    expect(summary.spectra!.samples.map((s) => [s.key, s.analysis?.ok])).toEqual([
      ['hcl', true],
      ['dcl', true],
    ]);
    expect(attempt!.flagSpectrumMismatch).toBe(false);

    const rows = summary.fromSpectrum!.rows;
    const v = (key: string, sp: string) => rows.find((r) => r.key === key && r.species === sp)?.verdict;
    expect(v('bandCentre', 'H35Cl')).toBe('within');
    expect(v('B0', 'H35Cl')).toBe('within');
    expect(v('bandCentre', 'D35Cl')).toBe('outside');

    // The marking view and the feedback carry it, with its legend and its own verdict words.
    const view = await loadMarkingView(attemptId);
    expect(view.spectrumAnalysis!.comparison!.legend).toMatch(/^From your spectrum: Oscillab read the spectrum you uploaded itself/);
    const row = view.spectrumAnalysis!.comparison!.rows.find((r) => r.label === 'Band centre ν̃₀ (D³⁵Cl)')!;
    expect(row.verdict).toBe('outside');
    const input = feedbackInputFromView(view);
    expect(input.fromSpectrum!.rows.find((r) => r.label === 'Band centre ν̃₀ (D³⁵Cl)')!.verdict.word).toBe('differs from the spectrum');
    const pdf = await buildFeedbackPdf(input);
    expect(pdf.byteLength).toBeGreaterThan(5000);
  });
});
