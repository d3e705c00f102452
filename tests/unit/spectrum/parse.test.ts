import { describe, expect, it } from 'vitest';
import { parseSpectrumFile } from '@/lib/spectrum/parse';
import { toCsv, toJcampDx } from '@/lib/spectrum/jcamp-write';
import { synthesizeSpectrum } from '@/lib/spectrum/synthesize';
import type { Spectrum } from '@/lib/spectrum/types';

function header(npoints: number, extra = ''): string {
  return [
    '##TITLE=hand-written test block',
    '##JCAMP-DX=4.24',
    '##DATA TYPE=INFRARED SPECTRUM',
    '##ORIGIN=test',
    '##OWNER=test',
    '##XUNITS=1/CM',
    '##YUNITS=ABSORBANCE',
    '##FIRSTX=1000',
    `##LASTX=${1000 + npoints - 1}`,
    `##NPOINTS=${npoints}`,
    '##XFACTOR=1',
    '##YFACTOR=0.01',
    extra,
    '##XYDATA=(X++(Y..Y))',
  ]
    .filter(Boolean)
    .join('\n');
}

function ok(r: ReturnType<typeof parseSpectrumFile>): Spectrum {
  if (!r.ok) throw new Error(`expected success, got: ${r.message}`);
  return r.spectrum;
}

const TWELVE = [10, 11, 12, 12, 12, 15, 20, 30, 45, 30, 20, 15];

describe('parseSpectrumFile: JCAMP-DX', () => {
  it('reads AFFN (X++(Y..Y)) with XFACTOR/YFACTOR applied', () => {
    const text = `${header(12)}\n1000 ${TWELVE.slice(0, 6).join(' ')}\n1006 ${TWELVE.slice(6).join(' ')}\n##END=\n`;
    const s = ok(parseSpectrumFile(text, 'jcamp'));
    expect(s.x).toEqual([1000, 1001, 1002, 1003, 1004, 1005, 1006, 1007, 1008, 1009, 1010, 1011]);
    expect(s.y.map((v) => Math.round(v * 100))).toEqual(TWELVE);
    expect(s.yKind).toBe('absorbance');
    expect(s.title).toBe('hand-written test block');
  });

  // The same twelve values in the compressed ASDF forms of JCAMP-DX 4.24, hand-encoded:
  // SQZ digits @=0, A–I = 1–9 (a–i negative); DIF J–R = +1…+9 (j–r negative), % = 0;
  // DUP S–Z = repeat count 1–8… of the previous token (T = twice in all).
  it.each([
    ['SQZ', '1000A0A1A2A2A2A5B0C0D5C0B0A5'],
    ['DIF', '1000A0JJ%%LNJ0J5j5j0n'],
    ['DIF with DUP', '1000A0JJ%TLNJ0J5j5j0n'],
  ])('reads the compressed %s form through jcampconverter', (_name, body) => {
    const s = ok(parseSpectrumFile(`${header(12)}\n${body}\n##END=\n`, 'jcamp'));
    expect(s.y.map((v) => Math.round(v * 100))).toEqual(TWELVE);
  });

  it('reads descending x and turns it ascending, and reads percent transmittance as a fraction', () => {
    const text = [
      '##TITLE=descending',
      '##JCAMP-DX=4.24',
      '##XUNITS=1/CM',
      '##YUNITS=%TRANSMITTANCE',
      '##FIRSTX=1011',
      '##LASTX=1000',
      '##NPOINTS=12',
      '##XFACTOR=1',
      '##YFACTOR=1',
      '##XYDATA=(X++(Y..Y))',
      '1011 99 98 97 90 80 50 40 80 90 97 98 99',
      '##END=',
    ].join('\n');
    const s = ok(parseSpectrumFile(text, 'jcamp'));
    expect(s.x[0]).toBe(1000);
    expect(s.x[11]).toBe(1011);
    expect(s.yKind).toBe('transmittance');
    expect(s.y[0]).toBeCloseTo(0.99, 12);
    expect(s.y[5]).toBeCloseTo(0.4, 12); // 1006 cm⁻¹ held 40 % when read from the top
  });

  it('refuses garbage inside ##XYDATA, naming the line', () => {
    // 13 header lines, the data line is line 14, the garbage line 15.
    const text = `${header(12)}\n1000 10 11 12 12 12 15\nthis is not data at all\n##END=\n`;
    const r = parseSpectrumFile(text, 'jcamp');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(/Line 15 of the JCAMP-DX file is not spectrum data/);
  });

  it('refuses letters that happen to be valid ASDF but give the wrong number of points', () => {
    // "hello" decodes as SQZ/DIF characters; the point count gives it away.
    const text = `${header(12)}\nhello hello\n##END=\n`;
    const r = parseSpectrumFile(text, 'jcamp');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(/declares 12 points.*holds \d+/);
  });

  it('refuses a file with no data, a peak table only, or not JCAMP at all', () => {
    const empty = parseSpectrumFile(`${header(12)}\n##END=\n`, 'jcamp');
    expect(empty.ok).toBe(false);
    const peaks = parseSpectrumFile('##TITLE=t\n##JCAMP-DX=4.24\n##PEAK TABLE=(XY..XY)\n1000, 0.5\n##END=\n', 'jcamp');
    expect(peaks.ok === false && peaks.message).toMatch(/peak table/);
    const junk = parseSpectrumFile('just some words', 'jcamp');
    expect(junk.ok === false && junk.message).toMatch(/must start with ##TITLE=/);
  });

  it('refuses an x axis it cannot convert and too many points', () => {
    const hz = header(12).replace('##XUNITS=1/CM', '##XUNITS=HZ');
    const r = parseSpectrumFile(`${hz}\n1000 ${TWELVE.join(' ')}\n##END=\n`, 'jcamp');
    expect(r.ok === false && r.message).toMatch(/HZ/);
    const big = parseSpectrumFile(`${header(12)}\n1000 ${TWELVE.join(' ')}\n##END=\n`, 'jcamp', { maxPoints: 10 });
    expect(big.ok === false && big.message).toMatch(/at most 10/);
    const declared = header(12).replace('##NPOINTS=12', '##NPOINTS=5000000');
    const huge = parseSpectrumFile(`${declared}\n1000 1\n##END=\n`, 'jcamp');
    expect(huge.ok === false && huge.message).toMatch(/5000000 points/);
  });
});

describe('JCAMP-DX writer round trip through jcampconverter', () => {
  const spectrum = synthesizeSpectrum({
    lines: [
      { wavenumber: 2906.246, intensity: 1 },
      { wavenumber: 2904.14, intensity: 0.32 },
    ],
    from: 2880,
    to: 2930,
    step: 0.25,
    fwhm: 0.7,
    noise: 0.002,
    seed: 9,
  });

  it('writes the records JCAMP-DX 4.24 asks for, lines within 80 characters', () => {
    const text = toJcampDx(spectrum, { title: 'SYNTHETIC round trip', notes: ['synthetic test data'] });
    for (const label of [
      'TITLE',
      'JCAMP-DX=4.24',
      'DATA TYPE=INFRARED SPECTRUM',
      'ORIGIN',
      'OWNER',
      'XUNITS=1/CM',
      'YUNITS=ABSORBANCE',
      'XFACTOR',
      'YFACTOR',
      'FIRSTX=2880',
      'LASTX=2930',
      'NPOINTS=201',
      'XYDATA=(X++(Y..Y))',
      'END=',
    ]) {
      expect(text).toContain(`##${label}`);
    }
    expect(text).toContain('##$OSCILLAB NOTE=synthetic test data');
    expect(text.split('\n').every((l) => l.length <= 80)).toBe(true);
  });

  it('reads back to the same grid and to the written precision, and writes identical text again', () => {
    const meta = { title: 'SYNTHETIC round trip' };
    const text = toJcampDx(spectrum, meta);
    const back = ok(parseSpectrumFile(text, 'jcamp'));
    expect(back.x).toHaveLength(spectrum.x.length);
    const yFactor = Number(/##YFACTOR=(\S+)/.exec(text)![1]);
    for (let i = 0; i < spectrum.x.length; i++) {
      expect(Math.abs(back.x[i] - spectrum.x[i])).toBeLessThan(1e-9);
      expect(Math.abs(back.y[i] - spectrum.y[i])).toBeLessThanOrEqual(yFactor / 2 + 1e-12);
    }
    expect(toJcampDx(back, meta)).toBe(text);
  });

  it('round-trips transmittance, and refuses unevenly spaced points', () => {
    const t: Spectrum = { ...spectrum, y: spectrum.y.map((a) => 10 ** -a), yKind: 'transmittance' };
    const back = ok(parseSpectrumFile(toJcampDx(t, { title: 'T' }), 'jcamp'));
    expect(back.yKind).toBe('transmittance');
    expect(back.y[100]).toBeCloseTo(t.y[100], 5);
    const uneven: Spectrum = { x: [1, 2, 4, 8], y: [0, 1, 0, 1], yKind: 'absorbance', title: '' };
    expect(() => toJcampDx(uneven, { title: 'x' })).toThrow(/evenly spaced/);
  });

  it('toCsv output reads back through the CSV path', () => {
    const csv = toCsv(spectrum, { comments: ['SYNTHETIC'] });
    const back = ok(parseSpectrumFile(csv, 'csv'));
    expect(back.yKind).toBe('absorbance');
    expect(back.x).toEqual(spectrum.x);
    back.y.forEach((v, i) => expect(v).toBeCloseTo(spectrum.y[i], 6));
  });
});

describe('parseSpectrumFile: CSV', () => {
  const rows = Array.from({ length: 20 }, (_, i) => [2900 + i * 0.5, 0.01 + (i === 10 ? 0.5 : 0)]);

  it('reads two columns with a header naming absorbance', () => {
    const s = ok(parseSpectrumFile(`Wavenumber (cm-1),Absorbance\n${rows.map((r) => r.join(',')).join('\n')}\n`, 'csv'));
    expect(s.x[0]).toBe(2900);
    expect(s.yKind).toBe('absorbance');
    expect(s.y[10]).toBeCloseTo(0.51, 12);
  });

  it('reads two columns without a header, inferring transmittance from a baseline near 1 (with a warning)', () => {
    const t = rows.map(([x, a]) => `${x}\t${(10 ** -a).toFixed(5)}`).join('\n');
    const r = parseSpectrumFile(t, 'csv');
    const s = ok(r);
    expect(s.yKind).toBe('transmittance');
    expect(r.ok && r.warnings.join(' ')).toMatch(/transmittance from the values/);
  });

  it('reads semicolons with decimal commas, and percent transmittance from the header', () => {
    const text = `Wellenzahl;%T\n${rows.map(([x, a]) => `${String(x).replace('.', ',')};${(100 * 10 ** -a).toFixed(3).replace('.', ',')}`).join('\n')}`;
    const r = parseSpectrumFile(text, 'csv');
    const s = ok(r);
    expect(s.x[1]).toBe(2900.5);
    expect(s.yKind).toBe('transmittance');
    expect(s.y[10]).toBeCloseTo(10 ** -0.51, 4);
    expect(r.ok && r.warnings.join(' ')).toMatch(/Decimal commas/);
  });

  it('names a broken row, and refuses too few points', () => {
    const broken = `x,y\n${rows
      .slice(0, 5)
      .map((r) => r.join(','))
      .join('\n')}\n2903,oops\n`;
    const r = parseSpectrumFile(broken, 'csv');
    expect(r.ok === false && r.message).toMatch(/Row 7 .*oops/);
    const few = parseSpectrumFile('1,2\n3,4\n', 'csv');
    expect(few.ok === false && few.message).toMatch(/only 2 points/);
  });
});

describe('parseSpectrumFile: hostile input stays fast', () => {
  // Each of these made a naive pattern or the converter take seconds to minutes.
  it.each([
    ['a title followed by 200 000 blank lines', `##TITLE=a\n${'\n'.repeat(200_000)}##END=\n`],
    ['200 000 labelled records', `##TITLE=a\n${'##TITLE=a\n'.repeat(200_000)}##END=\n`],
    ['a 100 000-space row in a CSV', `1${' '.repeat(100_000)}x\n1,2\n`],
  ])('refuses %s within a second', (_name, text) => {
    const t0 = performance.now();
    const r = parseSpectrumFile(text, text.startsWith('##') ? 'jcamp' : 'csv');
    expect(r.ok).toBe(false);
    expect(performance.now() - t0).toBeLessThan(1000);
  });
});
