import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseLineList } from '@/lib/linelist';
import { parseSpectrumFile } from '@/lib/spectrum/parse';
import { compareLinesToPeaks, pickPeaks } from '@/lib/spectrum/peaks';
import { sniffUpload } from '@/lib/spectrum/sniff';

const ROOT = path.resolve(__dirname, '../../..');
const DIR = path.join(ROOT, 'tests/fixtures/spectra');
const SETS: Record<string, string[]> = {
  'hcl-298k': ['H35Cl', 'H37Cl'],
  'dcl-298k': ['D35Cl', 'D37Cl'],
  'hbr-298k': ['H79Br', 'H81Br'],
  'co-298k': ['12C16O'],
};

describe('generated spectra in tests/fixtures/spectra', () => {
  it.each(Object.keys(SETS))('%s: small, sniffed by content, labelled synthetic, readable as JCAMP-DX and CSV', (name) => {
    for (const ext of ['jdx', 'csv']) {
      const file = path.join(DIR, `${name}.${ext}`);
      expect(statSync(file).size).toBeLessThan(300 * 1024);
      const bytes = new Uint8Array(readFileSync(file));
      const sniff = sniffUpload(bytes, `${name}.${ext}`);
      expect(sniff).toMatchObject({ ok: true, kind: ext === 'jdx' ? 'jcamp' : 'csv' });
      const text = readFileSync(file, 'utf8');
      expect(text).toMatch(ext === 'jdx' ? /^##TITLE=SYNTHETIC / : /^# SYNTHETIC SPECTRUM/);
      if (ext === 'jdx') expect(text).toMatch(/^##\$OSCILLAB NOTE=SYNTHETIC SPECTRUM/m);
      const r = parseSpectrumFile(text, ext === 'jdx' ? 'jcamp' : 'csv');
      if (!r.ok) throw new Error(r.message);
      expect(r.warnings).toEqual([]);
      expect(r.spectrum.yKind).toBe(name === 'hbr-298k' ? 'transmittance' : 'absorbance');
    }
  });

  it.each(Object.entries(SETS))('%s: the line lists parse cleanly, match peaks, and together leave no strong peak out', (name, species) => {
    const r = parseSpectrumFile(readFileSync(path.join(DIR, `${name}.jdx`), 'utf8'), 'jcamp');
    if (!r.ok) throw new Error(r.message);
    const peaks = pickPeaks(r.spectrum);
    const all = species.flatMap((sp) => {
      const parsed = parseLineList(readFileSync(path.join(DIR, `${name}.${sp}.lines.csv`), 'utf8'));
      expect(parsed.errors).toEqual([]);
      expect(parsed.warnings).toEqual([]);
      expect(parsed.lines.every((l) => l.branch !== undefined)).toBe(true);
      return parsed.lines;
    });
    const cmp = compareLinesToPeaks(all, peaks);
    expect(cmp.summary.missing).toBe(0);
    // Lines at 2 % of the strongest can drown in the noise; nearly all must be found.
    expect(cmp.summary.matched / cmp.summary.reported).toBeGreaterThan(0.9);
  });

  it('regenerates byte for byte (the script is deterministic and the fixtures are current)', () => {
    const tmp = mkdtempSync(path.join(os.tmpdir(), 'oscillab-spectra-'));
    try {
      execFileSync(process.execPath, ['--import', 'tsx', path.join(ROOT, 'scripts/make-spectra.ts'), tmp], { cwd: ROOT, stdio: 'pipe' });
      const expected = readdirSync(DIR).sort();
      expect(readdirSync(tmp).sort()).toEqual(expected);
      for (const f of expected) expect(readFileSync(path.join(tmp, f), 'utf8'), f).toBe(readFileSync(path.join(DIR, f), 'utf8'));
    } finally {
      rmSync(tmp, { recursive: true, force: true });
    }
  }, 60_000);
});
