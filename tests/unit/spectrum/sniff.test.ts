import { describe, expect, it } from 'vitest';
import { mulberry32 } from '@/lib/spectrum/random';
import { extensionOf, sniffUpload } from '@/lib/spectrum/sniff';

const enc = (s: string) => new TextEncoder().encode(s);

const PDF = '%PDF-1.7\n%\u00e2\u00e3\n1 0 obj\n<< /Type /Catalog /Pages 2 0 R >>\nendobj\ntrailer\n<< /Root 1 0 R >>\n%%EOF\n';
const JCAMP = '##TITLE=test\n##JCAMP-DX=4.24\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n##XYDATA=(X++(Y..Y))\n1000 1 2 3\n##END=\n';
const CSV = 'wavenumber,absorbance\n2900.0,0.01\n2900.2,0.02\n2900.4,0.05\n';

function latin1Bytes(s: string): Uint8Array {
  return Uint8Array.from(s, (ch) => ch.charCodeAt(0));
}

describe('sniffUpload: accepted content', () => {
  it('recognises a PDF from its header and end marker', () => {
    expect(sniffUpload(latin1Bytes(PDF), 'report.pdf')).toMatchObject({ kind: 'pdf', ok: true, problems: [] });
  });

  it('recognises JCAMP-DX, also after a byte-order mark and blank lines', () => {
    expect(sniffUpload(enc(JCAMP), 'hcl.jdx')).toMatchObject({ kind: 'jcamp', ok: true });
    expect(sniffUpload(enc(`\uFEFF\n  \n${JCAMP}`), 'hcl.dx')).toMatchObject({ kind: 'jcamp', ok: true });
  });

  it('recognises two-column CSV, comma, semicolon with decimal commas, tab, and spaces', () => {
    expect(sniffUpload(enc(CSV), 'spectrum.csv')).toMatchObject({ kind: 'csv', ok: true });
    expect(sniffUpload(enc('2900,0;0,01\n2900,2;0,02\n'), 'spectrum.csv').kind).toBe('csv');
    expect(sniffUpload(enc('2900.0\t0.01\n2900.2\t0.02\n'), 'spectrum.txt').kind).toBe('csv');
    expect(sniffUpload(enc('# synthetic\n2900.0  0.01\n2900.2  0.02\n'), 'spectrum.txt').kind).toBe('csv');
  });

  it('decides by content: a JCAMP-DX file named .txt is accepted as JCAMP-DX', () => {
    expect(sniffUpload(enc(JCAMP), 'export.txt')).toMatchObject({ kind: 'jcamp', ok: true });
  });
});

describe('sniffUpload: refusals', () => {
  it('refuses a zero-byte file, whatever its name', () => {
    const r = sniffUpload(new Uint8Array(0), 'report.pdf');
    expect(r.ok).toBe(false);
    expect(r.kind).toBe('unknown');
    expect(r.problems[0]).toMatch(/empty \(0 bytes\)/);
  });

  it('reports a lying extension: a JCAMP-DX file named .pdf', () => {
    const r = sniffUpload(enc(JCAMP), 'report.pdf');
    expect(r.kind).toBe('jcamp');
    expect(r.declaredKind).toBe('pdf');
    expect(r.ok).toBe(false);
    expect(r.problems.join(' ')).toMatch(/named "\.pdf" but its content is a JCAMP-DX spectrum/);
  });

  it('reports a PDF named .jdx', () => {
    const r = sniffUpload(latin1Bytes(PDF), 'spectrum.jdx');
    expect(r.kind).toBe('pdf');
    expect(r.ok).toBe(false);
    expect(r.problems.join(' ')).toMatch(/\.jdx.*PDF/);
  });

  it('refuses random binary bytes named .csv', () => {
    const rnd = mulberry32(42);
    const bytes = Uint8Array.from({ length: 4096 }, () => Math.floor(rnd() * 256));
    const r = sniffUpload(bytes, 'spectrum.csv');
    expect(r.kind).toBe('unknown');
    expect(r.ok).toBe(false);
    expect(r.problems.join(' ')).toMatch(/binary/);
  });

  it('refuses a PNG named .pdf', () => {
    const png = Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
    const r = sniffUpload(png, 'report.pdf');
    expect(r).toMatchObject({ kind: 'unknown', ok: false });
  });

  it('refuses a PDF whose start also carries a JCAMP-DX header (polyglot)', () => {
    const poly = `%PDF-1.4\n##TITLE=spectrum\n##END=\n${PDF.slice(9)}`;
    const r = sniffUpload(latin1Bytes(poly), 'report.pdf');
    expect(r.kind).toBe('pdf');
    expect(r.ok).toBe(false);
    expect(r.problems.join(' ')).toMatch(/JCAMP-DX header/);
  });

  it('refuses a PDF that embeds HTML script at its start (polyglot)', () => {
    const poly = `%PDF-1.4\n<html><script>alert(1)</script></html>\n${PDF.slice(9)}`;
    const r = sniffUpload(latin1Bytes(poly), 'report.pdf');
    expect(r.ok).toBe(false);
    expect(r.problems.join(' ')).toMatch(/HTML or script/);
  });

  it('refuses a PDF with embedded JavaScript actions', () => {
    const js = PDF.replace('/Type /Catalog', '/Type /Catalog /OpenAction << /S /JavaScript /JS (app.alert(1)) >>');
    const r = sniffUpload(latin1Bytes(js), 'report.pdf');
    expect(r.ok).toBe(false);
    expect(r.problems.join(' ')).toMatch(/JavaScript/);
  });

  it('refuses a truncated PDF (no %%EOF)', () => {
    const r = sniffUpload(latin1Bytes(PDF.replace('%%EOF', '')), 'report.pdf');
    expect(r.ok).toBe(false);
    expect(r.problems.join(' ')).toMatch(/%%EOF/);
  });

  it('refuses text that puts a PDF header after leading whitespace', () => {
    const r = sniffUpload(latin1Bytes(`  \n${PDF}`), 'report.pdf');
    expect(r.ok).toBe(false);
  });

  it('refuses a JCAMP-DX file without ##END= and an HTML page named .jdx', () => {
    expect(sniffUpload(enc('##TITLE=x\n##XYDATA=(X++(Y..Y))\n1 2 3\n'), 'a.jdx').problems.join(' ')).toMatch(/##END=/);
    const html = sniffUpload(enc('<!DOCTYPE html><html><body>hi</body></html>'), 'a.jdx');
    expect(html).toMatchObject({ kind: 'unknown', ok: false });
    expect(html.problems.join(' ')).toMatch(/HTML/);
  });

  it('refuses prose named .csv and an extension it does not accept', () => {
    const prose = sniffUpload(enc('Dear TA,\nplease find my spectrum attached.\nThanks\n'), 'spectrum.csv');
    expect(prose).toMatchObject({ kind: 'unknown', ok: false });
    expect(prose.problems[0]).toMatch(/not a two-column CSV/);
    const exe = sniffUpload(enc(CSV), 'spectrum.exe');
    expect(exe.ok).toBe(false);
    expect(exe.problems[0]).toMatch(/"\.exe" are not accepted/);
  });
});

describe('extensionOf', () => {
  it('takes the base name only, so path tricks do not change the extension', () => {
    expect(extensionOf('../../etc/passwd')).toBe('');
    expect(extensionOf('C:\\Users\\x\\Report.PDF')).toBe('pdf');
    expect(extensionOf('.jdx')).toBe('');
    expect(extensionOf('a.tar.jdx')).toBe('jdx');
  });
});

describe('sniffUpload: hostile input stays fast', () => {
  it('decides on a 64 KB run of spaces between numbers within a second', () => {
    const t0 = performance.now();
    const r = sniffUpload(enc(`1${' '.repeat(64_000)}x\n1 2\n`), 'a.csv');
    expect(r.ok).toBe(false);
    expect(performance.now() - t0).toBeLessThan(1000);
  });
});
