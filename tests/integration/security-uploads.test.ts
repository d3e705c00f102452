/**
 * Security and robustness, round two (issue 14), uploads: a small JCAMP-DX file whose DUP
 * compression expands to billions of points, CSV files too long or too wide to be a spectrum, and
 * PDFs hiding script behind a name escape or inside a compressed object stream. Each is refused
 * with a clear 4xx that leaves nothing in the database or the upload directory; the reader runs
 * in a worker thread whose memory and time limits end the worker, not the server.
 */
import fs from 'node:fs';
import path from 'node:path';
import { deflateSync } from 'node:zlib';
import { beforeAll, describe, expect, it } from 'vitest';
import { models } from '@/models';
import { buildWorld, type World } from '@/tests/helpers/world';
import { apiRequest } from '@/tests/helpers/session';
import { PUT as saveDraftRoute } from '@/app/api/submissions/draft/route';
import { POST as uploadRoute } from '@/app/api/uploads/route';
import { GET as health } from '@/app/api/health/route';
import { readUploadOffThread } from '@/lib/spectrum/worker';
import { buildPractical, draftFor, SPECTRA_DIR } from '@/tests/fixtures/submissions/practical';

let world: World;
let draftId: number;

/**
 * 188 bytes: one data line "4000 A0T00000000", i.e. the value 0 (SQZ "A0" is 10 in ASDF; the value
 * is irrelevant) repeated 200 million times by DUP "T00000000" (JCAMP-DX 4.24, ASDF compression).
 * Before the points were counted first, the converter built every point and the process died.
 */
export const JCAMP_DUP_BOMB = Buffer.from(
  '##TITLE=bomb\n##JCAMP-DX=4.24\n##DATA TYPE=INFRARED SPECTRUM\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##XFACTOR=1\n##YFACTOR=1\n##FIRSTX=4000\n##LASTX=400\n##XYDATA=(X++(Y..Y))\n4000 A0T00000000\n##END=\n',
);
/** The same with 40 million points (DUP "V0000000"): refused before, but only after seconds of work. */
const JCAMP_40M = Buffer.from(JCAMP_DUP_BOMB.toString().replace('A0T00000000', 'A0V0000000'));

function pdfWith(objects: string[]): Buffer {
  return Buffer.from(`%PDF-1.4\n${objects.join('\n')}\ntrailer<</Size ${objects.length + 1}/Root 1 0 R>>\n%%EOF\n`, 'latin1');
}

function uploadDirFiles() {
  const dir = process.env.UPLOAD_DIR!;
  return fs.existsSync(dir) ? fs.readdirSync(dir).filter((f) => !fs.statSync(path.join(dir, f)).isDirectory()) : [];
}

async function send(name: string, bytes: Buffer, kind: 'spectrum' | 'report') {
  const form = new FormData();
  form.set('submissionId', String(draftId));
  form.set('kind', kind);
  form.set('file', new Blob([new Uint8Array(bytes)]), name);
  const res = await uploadRoute(await apiRequest('/api/uploads', { as: world.people.student.id, method: 'POST', rawBody: form }), {});
  return { status: res.status, body: (await res.json()) as { error?: string; id?: number } };
}

async function expectRefused(name: string, bytes: Buffer, kind: 'spectrum' | 'report', status: number, message: RegExp) {
  const rowsBefore = await models().Upload.count();
  const filesBefore = uploadDirFiles().length;
  const r = await send(name, bytes, kind);
  expect(r.status, JSON.stringify(r.body)).toBe(status);
  expect(r.body.error).toMatch(message);
  expect(await models().Upload.count()).toBe(rowsBefore);
  expect(uploadDirFiles().length).toBe(filesBefore);
}

beforeAll(async () => {
  world = await buildWorld();
  const practicalId = (await buildPractical(world)).practical.id;
  const res = await saveDraftRoute(
    await apiRequest('/api/submissions/draft', {
      as: world.people.student.id,
      method: 'PUT',
      body: { practicalId, draft: draftFor('H35Cl', {}) },
    }),
    {},
  );
  draftId = (await res.json()).id;
});

describe('spectra that expand past the limit', () => {
  it('refuses the 188-byte DUP bomb at once, and the server goes on answering', async () => {
    expect(JCAMP_DUP_BOMB.length).toBe(188);
    await expectRefused('bomb.jdx', JCAMP_DUP_BOMB, 'spectrum', 422, /expand to more than 200000 points/);
    expect((await health(new Request('http://localhost/api/health'), {})).status).toBe(200);
  });

  it('refuses the 40-million-point variant the same way', async () => {
    await expectRefused('forty-million.jdx', JCAMP_40M, 'spectrum', 422, /expand to more than 200000 points/);
  });

  it('still accepts the compressed and plain spectra it accepted before', async () => {
    const ok = await send('hcl.jdx', fs.readFileSync(path.join(SPECTRA_DIR, 'hcl-298k.jdx')), 'spectrum');
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    // SQZ values with DUP counts that expand to 12 points: within the limit.
    const small = Buffer.from(
      '##TITLE=small\n##JCAMP-DX=4.24\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##XFACTOR=1\n##YFACTOR=1\n##FIRSTX=2000\n##LASTX=2011\n##NPOINTS=12\n##XYDATA=(X++(Y..Y))\n2000 A0U B0U\n2006 C0U D0U\n##END=\n',
    );
    const dup = await send('small.jdx', small, 'spectrum');
    expect(dup.status, JSON.stringify(dup.body)).toBe(201);
  });

  it('refuses a CSV row far longer than two numbers, and a CSV with more rows than a spectrum may have', async () => {
    const wide = Buffer.from(
      `wavenumber,absorbance\n2000,0.1\n2001,0.2\n2002,0.3\n2003,0.2\n2004,0.1\n2005,0.2,${'1,'.repeat(50_000)}1\n2006,0.3\n`,
    );
    await expectRefused('wide.csv', wide, 'spectrum', 422, /Line 7 of the CSV file is 100010 characters long/);
    const rows: string[] = [];
    for (let i = 0; i < 202_000; i++) rows.push(`${1000 + i / 100},${i % 7}`);
    await expectRefused('long.csv', Buffer.from(rows.join('\n')), 'spectrum', 422, /more than 201000 lines/);
  });
});

describe('report PDFs', () => {
  it('refuses JavaScript written with a name escape (/Java#53cript)', async () => {
    const escaped = pdfWith([
      '1 0 obj<</Type/Catalog/Pages 2 0 R/OpenAction 3 0 R>>endobj',
      '2 0 obj<</Type/Pages/Kids[]/Count 0>>endobj',
      '3 0 obj<</S/Java#53cript/JS(app.alert(1))>>endobj',
    ]);
    await expectRefused('report.pdf', escaped, 'report', 415, /embedded JavaScript/);
    const shortName = pdfWith([
      '1 0 obj<</Type/Catalog/Pages 2 0 R/OpenAction 3 0 R>>endobj',
      '2 0 obj<</Type/Pages/Kids[]/Count 0>>endobj',
      '3 0 obj<</S/#4a#61vaScript/#4A#53(app.alert(1))>>endobj',
    ]);
    await expectRefused('report.pdf', shortName, 'report', 415, /embedded JavaScript/);
  });

  it('refuses JavaScript hidden in a compressed object stream', async () => {
    const inner = deflateSync(Buffer.from('3 0 <</S/JavaScript/JS(app.alert(1))>>'));
    const pdf = Buffer.concat([
      Buffer.from('%PDF-1.5\n1 0 obj<</Type/Catalog/Pages 2 0 R/OpenAction 3 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[]/Count 0>>endobj\n'),
      Buffer.from(`4 0 obj<</Type/ObjStm/N 1/First 4/Filter/FlateDecode/Length ${inner.length}>>stream\n`),
      inner,
      Buffer.from('\nendstream\nendobj\ntrailer<</Size 5/Root 1 0 R>>\n%%EOF\n'),
    ]);
    await expectRefused('report.pdf', pdf, 'report', 415, /embedded JavaScript/);
  });

  it('still accepts a plain PDF whose names only look alike (/JSON, /Javascripts)', async () => {
    const plain = pdfWith([
      '1 0 obj<</Type/Catalog/Pages 2 0 R/JSON 1/Javascripts 2>>endobj',
      '2 0 obj<</Type/Pages/Kids[]/Count 0>>endobj',
    ]);
    const r = await send('report.pdf', plain, 'report');
    expect(r.status, JSON.stringify(r.body)).toBe(201);
  });
});

describe('the reader runs in a worker with limits', () => {
  const csv = () => {
    const rows: string[] = [];
    for (let i = 0; i < 150_000; i++) rows.push(`${1000 + i / 100} ${Math.sin(i / 50).toFixed(4)}`);
    return new Uint8Array(Buffer.from(rows.join('\n')));
  };

  it('a reading that runs past its time limit ends the worker and comes back as a refusal', async () => {
    const r = await readUploadOffThread(csv(), 'big.csv', true, { timeoutMs: 5, maxMemoryMb: 256 });
    expect(r).toEqual({ ok: false, reason: 'timeout', message: 'Reading the file took longer than 5 ms and was stopped.' });
  });

  it('a reading that needs more memory than allowed ends the worker, not this process', async () => {
    const r = await readUploadOffThread(csv(), 'big.csv', true, { timeoutMs: 60_000, maxMemoryMb: 4 });
    expect(r).toMatchObject({ ok: false, reason: 'memory' });
    // And this process still reads files.
    const ok = await readUploadOffThread(new Uint8Array(fs.readFileSync(path.join(SPECTRA_DIR, 'co-298k.csv'))), 'co.csv', true);
    expect(ok.ok && ok.reading.parsed?.ok && ok.reading.parsed.spectrum.x.length).toBe(1501);
  });
});
