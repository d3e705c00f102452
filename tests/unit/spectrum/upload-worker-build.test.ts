/**
 * The upload reader's worker as a production server runs it: compiled by `npm run build`
 * (scripts/build-worker.mjs) into one plain JavaScript file that Node starts without tsx. The
 * compiled worker must read files exactly as the sources do, keep its limits, and stand alone.
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readUpload } from '@/lib/spectrum/read-upload';
import { readUploadOffThread, uploadWorkerEntry } from '@/lib/spectrum/worker';

const SPECTRA = path.resolve('tests/fixtures/spectra');
const dist = fs.mkdtempSync(path.join(os.tmpdir(), 'oscillab-worker-build-'));
const compiled = path.join(dist, 'oscillab', 'upload-worker.mjs');
const saved = { NODE_ENV: process.env.NODE_ENV, NEXT_DIST_DIR: process.env.NEXT_DIST_DIR };
const env = process.env as Record<string, string | undefined>;

beforeAll(() => {
  execFileSync(process.execPath, ['scripts/build-worker.mjs'], { env: { ...process.env, NEXT_DIST_DIR: dist }, stdio: 'pipe' });
  env.NODE_ENV = 'production';
  env.NEXT_DIST_DIR = dist;
});
afterAll(() => {
  env.NODE_ENV = saved.NODE_ENV;
  env.NEXT_DIST_DIR = saved.NEXT_DIST_DIR;
  fs.rmSync(dist, { recursive: true, force: true });
});

describe('the compiled upload worker', () => {
  it('is what a production server starts, and it imports nothing but Node itself', () => {
    expect(uploadWorkerEntry()).toBe(compiled);
    const source = fs.readFileSync(compiled, 'utf8');
    const imports = [...source.matchAll(/^\s*import\s[^'"]*['"]([^'"]+)['"]/gm), ...source.matchAll(/\brequire\(['"]([^'"]+)['"]\)/g)].map(
      (m) => m[1],
    );
    expect(
      imports.filter((s) => !s.startsWith('node:') && !['fs', 'path', 'zlib', 'worker_threads', 'buffer', 'stream', 'util'].includes(s)),
    ).toEqual([]);
    expect(source).not.toMatch(/tsx/);
  });

  it.each(['co-298k.jdx', 'co-298k.csv', 'hcl-298k.csv', 'README.md'])(
    'reads %s exactly as the sources do in this process',
    async (file) => {
      const bytes = new Uint8Array(fs.readFileSync(path.join(SPECTRA, file)));
      const off = await readUploadOffThread(bytes, file, true);
      expect(off.ok).toBe(true);
      expect(off.ok && off.reading).toEqual(JSON.parse(JSON.stringify(readUpload(bytes, file, true))));
    },
  );

  it('keeps its time limit', async () => {
    const bytes = new Uint8Array(fs.readFileSync(path.join(SPECTRA, 'hcl-298k.csv')));
    const r = await readUploadOffThread(bytes, 'hcl.csv', true, { timeoutMs: 1, maxMemoryMb: 256 });
    expect(r).toMatchObject({ ok: false, reason: 'timeout' });
  });

  it('is not used outside production, nor when a build did not compile it', () => {
    env.NODE_ENV = 'test';
    expect(uploadWorkerEntry()).toBe(path.resolve('lib/spectrum/upload-worker.mjs'));
    env.NODE_ENV = 'production';
    env.NEXT_DIST_DIR = path.join(dist, 'elsewhere');
    expect(uploadWorkerEntry()).toBe(path.resolve('lib/spectrum/upload-worker.mjs'));
    env.NEXT_DIST_DIR = dist;
  });
});
