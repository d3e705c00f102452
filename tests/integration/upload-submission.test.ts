/**
 * Uploads, access by id and double submits: each refusal is a clear 4xx that leaves nothing
 * in the database or the upload directory.
 */
import fs from 'node:fs';
import path from 'node:path';
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import { models } from '@/models';
import { buildWorld, type World } from '@/tests/helpers/world';
import { apiRequest, params } from '@/tests/helpers/session';
import { PUT as saveDraftRoute } from '@/app/api/submissions/draft/route';
import { GET as getSubmission } from '@/app/api/submissions/[id]/route';
import { POST as submit } from '@/app/api/submissions/[id]/submit/route';
import { GET as getFeedback } from '@/app/api/submissions/[id]/feedback/route';
import { POST as uploadRoute } from '@/app/api/uploads/route';
import { GET as getUpload } from '@/app/api/uploads/[id]/route';
import { buildPractical, CONST, draftFor, kFrom, muU, SPECTRA_DIR } from '@/tests/fixtures/submissions/practical';

const saveDraft = (r: Request) => saveDraftRoute(r, {});
const upload = (r: Request) => uploadRoute(r, {});
let world: World;
let practicalId: number;
let draftId: number;

const JCAMP = fs.readFileSync(path.join(SPECTRA_DIR, 'hcl-298k.jdx'));
/** A minimal well-formed PDF (header, one empty page, xref, trailer, %%EOF). */
const PDF = Buffer.from(
  '%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[3 0 R]/Count 1>>endobj\n3 0 obj<</Type/Page/Parent 2 0 R/MediaBox[0 0 612 792]>>endobj\nxref\n0 4\n0000000000 65535 f \n0000000009 00000 n \n0000000052 00000 n \n0000000101 00000 n \ntrailer<</Size 4/Root 1 0 R>>\nstartxref\n170\n%%EOF\n',
);

function uploadDirFiles() {
  const dir = process.env.UPLOAD_DIR!;
  return fs.existsSync(dir) ? fs.readdirSync(dir).filter((f) => !fs.statSync(path.join(dir, f)).isDirectory()) : [];
}

async function send(as: number, name: string, bytes: Buffer | Uint8Array, kind: string, submissionId = draftId) {
  const form = new FormData();
  form.set('submissionId', String(submissionId));
  form.set('kind', kind);
  form.set('file', new Blob([new Uint8Array(bytes)]), name);
  const res = await upload(await apiRequest('/api/uploads', { as, method: 'POST', rawBody: form }));
  return { status: res.status, body: await res.json() };
}

async function expectRefused(as: number, name: string, bytes: Buffer | Uint8Array, kind: string, status: number, message: RegExp) {
  const rowsBefore = await models().Upload.count();
  const filesBefore = uploadDirFiles().length;
  const r = await send(as, name, bytes, kind);
  expect(r.status, JSON.stringify(r.body)).toBe(status);
  expect(r.body.error).toMatch(message);
  expect(await models().Upload.count()).toBe(rowsBefore);
  expect(uploadDirFiles().length).toBe(filesBefore);
}

beforeAll(async () => {
  world = await buildWorld();
  practicalId = (await buildPractical(world)).practical.id;
  const res = await saveDraft(
    await apiRequest('/api/submissions/draft', {
      as: world.people.student.id,
      method: 'PUT',
      body: { practicalId, draft: draftFor('H35Cl', {}) },
    }),
  );
  draftId = (await res.json()).id;
});

describe('uploads', () => {
  it('accepts a JCAMP-DX spectrum and a PDF, stores them under random names with their sha256, serves them back with nosniff', async () => {
    const s = await send(world.people.student.id, 'my spectrum.jdx', JCAMP, 'spectrum');
    expect(s.status, JSON.stringify(s.body)).toBe(201);
    const p = await send(world.people.student.id, 'report.pdf', PDF, 'report');
    expect(p.status, JSON.stringify(p.body)).toBe(201);
    const row = await models().Upload.findByPk(s.body.id);
    expect(row!.storedName).toMatch(/^[a-f0-9]{32}\.jdx$/);
    expect(row!.sha256).toMatch(/^[a-f0-9]{64}$/);
    const got = await getUpload(
      await apiRequest(`/api/uploads/${p.body.id}`, { as: world.people.student.id }),
      params({ id: String(p.body.id) }),
    );
    expect(got.status).toBe(200);
    expect(got.headers.get('x-content-type-options')).toBe('nosniff');
    expect(got.headers.get('content-disposition')).toMatch(/^inline/);
    expect(Buffer.from(await got.arrayBuffer()).equals(PDF)).toBe(true);
    const spec = await getUpload(
      await apiRequest(`/api/uploads/${s.body.id}`, { as: world.people.student.id }),
      params({ id: String(s.body.id) }),
    );
    expect(spec.headers.get('content-disposition')).toMatch(/^attachment/);
  });

  it('refuses a file that lies about its type (HTML named .pdf, PDF named .jdx)', async () => {
    await expectRefused(
      world.people.student.id,
      'report.pdf',
      Buffer.from('<html><script>alert(1)</script></html>'),
      'report',
      415,
      /HTML|not a PDF|PDF/i,
    );
    await expectRefused(world.people.student.id, 'spectrum.jdx', PDF, 'spectrum', 415, /content is a PDF|spectrum/i);
  });

  it('refuses empty files and a 0-byte PDF', async () => {
    await expectRefused(world.people.student.id, 'report.pdf', Buffer.alloc(0), 'report', 400, /empty/i);
    await expectRefused(world.people.student.id, 'empty.csv', Buffer.alloc(0), 'spectrum', 400, /empty/i);
  });

  it('refuses an oversize spectrum (limit from SPECTRUM_MAX_BYTES)', async () => {
    process.env.SPECTRUM_MAX_BYTES = String(200 * 1024);
    try {
      const big = Buffer.concat([JCAMP, Buffer.from('\n'.repeat(300 * 1024 - JCAMP.length))]);
      await expectRefused(world.people.student.id, 'big.jdx', big, 'spectrum', 413, /too large|at most/i);
    } finally {
      delete process.env.SPECTRUM_MAX_BYTES;
    }
  });

  it('refuses path-traversal file names', async () => {
    for (const name of ['../../etc/report.pdf', '..\\..\\report.pdf', '/etc/passwd.pdf', '.hidden.pdf']) {
      // Written by hand: FormData would strip the folders before they reach the server.
      const boundary = 'oscillabtestboundary';
      const body = Buffer.concat([
        Buffer.from(
          `--${boundary}\r\nContent-Disposition: form-data; name="submissionId"\r\n\r\n${draftId}\r\n--${boundary}\r\nContent-Disposition: form-data; name="kind"\r\n\r\nreport\r\n`,
        ),
        Buffer.from(
          `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${name.replace(/\\/g, '\\\\')}"\r\nContent-Type: application/pdf\r\n\r\n`,
        ),
        PDF,
        Buffer.from(`\r\n--${boundary}--\r\n`),
      ]);
      const rowsBefore = await models().Upload.count();
      const filesBefore = uploadDirFiles().length;
      const res = await upload(
        await apiRequest('/api/uploads', {
          as: world.people.student.id,
          method: 'POST',
          rawBody: body,
          headers: { 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': String(body.length) },
        }),
      );
      const json = await res.json();
      if (name.includes('\\') && res.status === 201) {
        // formidable itself drops everything before a backslash: only the plain name survives, stored under a random name.
        expect(json.originalName).toBe('report.pdf');
        const row = await models().Upload.findByPk(json.id);
        expect(row!.storedName).toMatch(/^[a-f0-9]{32}\.pdf$/);
        continue;
      }
      expect(res.status, `${name}: ${JSON.stringify(json)}`).toBe(400);
      expect(json.error).toMatch(/plain name/i);
      expect(await models().Upload.count()).toBe(rowsBefore);
      expect(uploadDirFiles().length).toBe(filesBefore);
    }
  });

  describe('slow clients', () => {
    const boundary = 'oscillabslowboundary';
    const multipart = () =>
      Buffer.concat([
        Buffer.from(
          `--${boundary}\r\nContent-Disposition: form-data; name="submissionId"\r\n\r\n${draftId}\r\n--${boundary}\r\nContent-Disposition: form-data; name="kind"\r\n\r\nreport\r\n`,
        ),
        Buffer.from(
          `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="slow.pdf"\r\nContent-Type: application/pdf\r\n\r\n`,
        ),
        PDF,
        Buffer.from(`\r\n--${boundary}--\r\n`),
      ]);
    const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
    /** Sends `body` in `pieces` chunks with `gapMs` between them; `stallAfter` chunks, then nothing more (the body never ends). */
    function trickle(body: Buffer, pieces: number, gapMs: number, stallAfter = Infinity) {
      const size = Math.ceil(body.length / pieces);
      let sent = 0;
      let cancelled = false;
      const stream = new ReadableStream<Uint8Array>({
        async pull(controller) {
          if (sent > 0) await sleep(gapMs);
          if (sent >= stallAfter) return new Promise<void>(() => undefined); // a client that has gone quiet
          const chunk = body.subarray(sent * size, (sent + 1) * size);
          sent++;
          if (chunk.length) controller.enqueue(new Uint8Array(chunk));
          if (sent * size >= body.length) controller.close();
        },
        cancel() {
          cancelled = true;
        },
      });
      return { stream, wasCancelled: () => cancelled };
    }
    async function post(stream: ReadableStream<Uint8Array>) {
      const req = await apiRequest('/api/uploads', {
        as: world.people.student.id,
        method: 'POST',
        headers: { 'content-type': `multipart/form-data; boundary=${boundary}` },
      });
      return upload(new Request(req.url, { method: 'POST', headers: req.headers, body: stream, duplex: 'half' } as RequestInit));
    }
    const saved = { idle: process.env.UPLOAD_IDLE_MS, total: process.env.UPLOAD_TOTAL_MS };
    afterEach(() => {
      for (const [k, v] of [
        ['UPLOAD_IDLE_MS', saved.idle],
        ['UPLOAD_TOTAL_MS', saved.total],
      ] as const) {
        if (v === undefined) delete process.env[k];
        else process.env[k] = v;
      }
    });

    it('cuts off an upload that stalls halfway with 408, leaving no file and no row', async () => {
      process.env.UPLOAD_IDLE_MS = '300';
      const rowsBefore = await models().Upload.count();
      const filesBefore = uploadDirFiles().length;
      const body = multipart();
      const { stream, wasCancelled } = trickle(body, 8, 20, 6); // the file part has begun, then silence
      const started = Date.now();
      const res = await post(stream);
      const elapsed = Date.now() - started;
      expect(res.status).toBe(408);
      expect((await res.json()).error).toMatch(/stalled \(nothing arrived for 300 ms\).*nothing was saved/);
      expect(elapsed).toBeLessThan(5_000); // cut off, not left to hang until the client gives up
      expect(wasCancelled()).toBe(true);
      expect(await models().Upload.count()).toBe(rowsBefore);
      expect(uploadDirFiles().length).toBe(filesBefore);
    });

    it('cuts off a steady trickle that runs past the total limit', async () => {
      process.env.UPLOAD_IDLE_MS = '400';
      process.env.UPLOAD_TOTAL_MS = '600';
      const rowsBefore = await models().Upload.count();
      const filesBefore = uploadDirFiles().length;
      const { stream } = trickle(multipart(), 40, 50); // each gap well inside the idle limit, 2 s in all
      const res = await post(stream);
      expect(res.status).toBe(408);
      expect((await res.json()).error).toMatch(/took longer than 600 ms/);
      expect(await models().Upload.count()).toBe(rowsBefore);
      expect(uploadDirFiles().length).toBe(filesBefore);
    });

    it('accepts a slow upload whose pauses stay inside the limits', async () => {
      process.env.UPLOAD_IDLE_MS = '1000';
      const { stream } = trickle(multipart(), 6, 100);
      const res = await post(stream);
      const json = await res.json();
      expect(res.status, JSON.stringify(json)).toBe(201);
      expect(json.originalName).toBe('slow.pdf');
      const row = await models().Upload.findByPk(json.id);
      expect(row!.size).toBe(PDF.length);
      expect(uploadDirFiles()).toContain(row!.storedName);
    });
  });

  it('refuses a JCAMP file with garbage data', async () => {
    const garbage = Buffer.from(
      '##TITLE=x\n##JCAMP-DX=4.24\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##XYDATA=(X++(Y..Y))\nhello world ?? §§\nmore junk\n##END=\n',
    );
    const r = await send(world.people.student.id, 'bad.jdx', garbage, 'spectrum');
    expect([415, 422]).toContain(r.status);
    expect(r.body.error).toMatch(/spectrum|JCAMP|could not/i);
  });

  it('another student cannot read the file or upload to the draft by changing an id', async () => {
    const up = await models().Upload.findOne({ where: { ownerId: world.people.student.id } });
    const res = await getUpload(
      await apiRequest(`/api/uploads/${up!.id}`, { as: world.people.otherStudent.id }),
      params({ id: String(up!.id) }),
    );
    // A draft's file is its student's own: to anyone else it does not exist (issue 14, item 9).
    expect(res.status).toBe(404);
    await expectRefused(world.people.otherStudent.id, 'report.pdf', PDF, 'report', 403, /permission/i);
    const missing = await getUpload(await apiRequest('/api/uploads/999999', { as: world.people.student.id }), params({ id: '999999' }));
    expect(missing.status).toBe(404);
  });
});

describe('drafts and submits', () => {
  it('a line list of 10⁵ rows is refused with nothing written', async () => {
    const lines = Array.from({ length: 100_000 }, (_, i) => ({ branch: null, J: null, wavenumber: 2000 + i / 100 }));
    const before = await models().Submission.findByPk(draftId);
    const res = await saveDraft(
      await apiRequest('/api/submissions/draft', {
        as: world.people.student.id,
        method: 'PUT',
        body: { practicalId, draft: { ...draftFor('H35Cl', {}), species: { H35Cl: { ...draftFor('H35Cl', {}).species.H35Cl, lines } } } },
      }),
    );
    expect([400, 413]).toContain(res.status);
    expect((await res.json()).error).toMatch(/too large|At most/i);
    const after = await models().Submission.findByPk(draftId);
    expect(after!.version).toBe(before!.version);
  });

  it("another student cannot read (404: a draft is its student's own) or submit (403) this draft, and unknown ids are 404", async () => {
    const read = await getSubmission(
      await apiRequest(`/api/submissions/${draftId}`, { as: world.people.otherStudent.id }),
      params({ id: String(draftId) }),
    );
    expect(read.status).toBe(404);
    const write = await submit(
      await apiRequest(`/api/submissions/${draftId}/submit`, {
        as: world.people.otherStudent.id,
        body: { version: 1, draft: draftFor('H35Cl', {}) },
      }),
      params({ id: String(draftId) }),
    );
    expect(write.status).toBe(403);
    const none = await getSubmission(
      await apiRequest('/api/submissions/424242', { as: world.people.student.id }),
      params({ id: '424242' }),
    );
    expect(none.status).toBe(404);
  });

  it('a double-clicked submit creates one attempt; the second click is a 409', async () => {
    const nu = 2886.0;
    const mu = muU(CONST.mH, CONST.mCl35); // AME2020 isotopic masses
    const cur = (await models().Submission.findByPk(draftId))!;
    const d = cur.draft as ReturnType<typeof draftFor>;
    const draft = {
      ...draftFor('H35Cl', {
        bandCentre: { value: '2886.0', unit: 'cm-1', uncertainty: '0.5' },
        reducedMass: { value: mu.toFixed(6), unit: 'u' },
        forceConstant: { value: kFrom(nu, mu).toFixed(1), unit: 'N/m', uncertainty: '0.3' }, // CODATA 2018 c
      }),
      spectrumUploadId: d.spectrumUploadId,
      reportUploadId: d.reportUploadId,
    };
    const click = async () =>
      submit(
        await apiRequest(`/api/submissions/${draftId}/submit`, { as: world.people.student.id, body: { version: cur.version, draft } }),
        params({ id: String(draftId) }),
      );
    const [a, b] = await Promise.all([click(), click()]);
    expect([a.status, b.status].sort()).toEqual([201, 409]);
    const attempts = await models().Submission.findAll({ where: { practicalId, studentId: world.people.student.id, attempt: 1 } });
    expect(attempts).toHaveLength(1);
    expect(await models().Submission.count({ where: { practicalId, studentId: world.people.student.id } })).toBe(2);
    // The uploads moved to the attempt; the spectrum check ran against the student's own file.
    const summary = attempts[0].checkSummary as { spectrum: { ok: boolean; matched: number; reported: number } };
    expect(summary.spectrum.ok).toBe(true);
    expect(summary.spectrum.matched).toBe(summary.spectrum.reported);
    expect(attempts[0].flagSpectrumMismatch).toBe(false);
  });

  it('feedback is 404 until released', async () => {
    const att = await models().Submission.findOne({ where: { practicalId, studentId: world.people.student.id, attempt: 1 } });
    const res = await getFeedback(
      await apiRequest(`/api/submissions/${att!.id}/feedback`, { as: world.people.student.id }),
      params({ id: String(att!.id) }),
    );
    expect(res.status).toBe(404);
  });

  it('an empty submission is refused with a message and no attempt', async () => {
    const cur = (await models().Submission.findByPk(draftId))!;
    const res = await submit(
      await apiRequest(`/api/submissions/${draftId}/submit`, {
        as: world.people.student.id,
        body: { version: cur.version, draft: draftFor('H35Cl', {}, []) },
      }),
      params({ id: String(draftId) }),
    );
    expect(res.status).toBe(400);
    expect((await res.json()).error).toMatch(/empty/);
    expect(await models().Submission.count({ where: { practicalId, studentId: world.people.student.id, attempt: 2 } })).toBe(0);
  });
});
