import { describe, expect, it } from 'vitest';
import { formatLineListCsv, LINE_LIST_MAX_ROWS, parseLineList } from '@/lib/linelist';

// Positions below are illustrative H³⁵Cl values of the kind students paste; the parser
// does not check them against anything, only reads them.

describe('parseLineList: spreadsheet pastes', () => {
  it('reads an Excel tab paste with a header, branch and J columns, and an extra intensity column', () => {
    const text = 'Branch\tJ\tWavenumber (cm-1)\tIntensity\r\nR\t0\t2906.25\t0.41\r\nR\t1\t2925.90\t0.62\r\nP\t1\t2865.10\t0.44\r\n';
    const r = parseLineList(text);
    expect(r.errors).toEqual([]);
    expect(r.warnings).toEqual([]);
    expect(r.format).toEqual({ delimiter: 'tab', header: true });
    expect(r.lines.map((l) => [l.branch, l.J, l.wavenumber, l.line])).toEqual([
      ['R', 0, 2906.25, 2],
      ['R', 1, 2925.9, 3],
      ['P', 1, 2865.1, 4],
    ]);
    expect(r.lines[0].raw).toBe('R\t0\t2906.25\t0.41');
  });

  it('uses the header to pick the position column when several numeric columns are present', () => {
    const text = 'Peak no.,Height,Position / cm-1\n1,0.45,2906.25\n2,0.62,2925.90\n';
    const r = parseLineList(text);
    expect(r.errors).toEqual([]);
    expect(r.lines.map((l) => l.wavenumber)).toEqual([2906.25, 2925.9]);
    expect(r.lines.every((l) => l.branch === undefined)).toBe(true);
  });

  it('reads comma-separated rows without a header', () => {
    const r = parseLineList('R,0,2906.25\nR,1,2925.9\nP,1,2865.1');
    expect(r.errors).toEqual([]);
    expect(r.format).toEqual({ delimiter: 'comma', header: false });
    expect(r.lines.map((l) => `${l.branch}(${l.J}) ${l.wavenumber}`)).toEqual(['R(0) 2906.25', 'R(1) 2925.9', 'P(1) 2865.1']);
  });

  it('reads a single column of positions as unassigned peaks', () => {
    const r = parseLineList('2906.25\n2925.90\n\n2865.10\n');
    expect(r.errors).toEqual([]);
    expect(r.lines.map((l) => [l.wavenumber, l.branch, l.J, l.line])).toEqual([
      [2906.25, undefined, undefined, 1],
      [2925.9, undefined, undefined, 2],
      [2865.1, undefined, undefined, 4],
    ]);
  });

  it('reads "P(3)", "R(0)", "P3", "R 0" and lower-case labels', () => {
    const r = parseLineList('P(3)\t2843.62\nR(0) 2906.25\nP3 2843.6\nR 1\t2925.9\nr(2), 2944.9\n');
    expect(r.errors).toEqual([]);
    expect(r.lines.map((l) => `${l.branch}${l.J}`)).toEqual(['P3', 'R0', 'P3', 'R1', 'R2']);
    // P(3) twice is worth a warning that names both rows.
    expect(r.warnings.map((w) => w.line)).toContain(3);
    expect(r.warnings.find((w) => w.line === 3)?.message).toMatch(/P\(3\).*line 1/);
  });

  it('reads space-separated rows under a header whose words do not line up with the cells', () => {
    const r = parseLineList('Line   Wavenumber (cm-1)\nP(3)   2843.62\nR(0)   2906.25\n');
    expect(r.errors).toEqual([]);
    expect(r.lines.map((l) => `${l.branch}(${l.J}) ${l.wavenumber}`)).toEqual(['P(3) 2843.62', 'R(0) 2906.25']);
    const m = parseLineList('m wavenumber\n-2 2843.62\n1 2906.25');
    expect(m.lines.map((l) => `${l.branch}(${l.J})`)).toEqual(['P(2)', 'R(0)']);
  });

  it('reads a running index m column: m = J + 1 for R(J), m = −J for P(J)', () => {
    const r = parseLineList('m\twavenumber\n1\t2906.25\n-1\t2865.10\n-3\t2821.5');
    expect(r.errors).toEqual([]);
    expect(r.lines.map((l) => `${l.branch}(${l.J})`)).toEqual(['R(0)', 'P(1)', 'P(3)']);
  });
});

describe('parseLineList: decimal commas', () => {
  it('reads a single column with decimal commas, with one warning', () => {
    const r = parseLineList('2906,25\n2925,90\n2865,10');
    expect(r.errors).toEqual([]);
    expect(r.lines.map((l) => l.wavenumber)).toEqual([2906.25, 2925.9, 2865.1]);
    expect(r.warnings).toHaveLength(1);
    expect(r.warnings[0].message).toMatch(/decimal comma/i);
    expect(r.warnings[0].line).toBe(1);
  });

  it('reads semicolon-separated fields with decimal commas ("R;0;2906,25")', () => {
    const r = parseLineList('R;0;2906,25\nP;1;2865,10');
    expect(r.errors).toEqual([]);
    expect(r.format.delimiter).toBe('semicolon');
    expect(r.lines.map((l) => [l.branch, l.J, l.wavenumber])).toEqual([
      ['R', 0, 2906.25],
      ['P', 1, 2865.1],
    ]);
    expect(r.warnings[0].message).toMatch(/decimal comma/i);
  });

  it('reads tab-separated fields with decimal commas', () => {
    const r = parseLineList('Zweig\tJ\tPosition\nR\t0\t2906,25\nP\t2\t2843,62');
    expect(r.errors).toEqual([]);
    expect(r.lines.map((l) => l.wavenumber)).toEqual([2906.25, 2843.62]);
    expect(r.warnings.some((w) => /decimal comma/i.test(w.message))).toBe(true);
  });

  it('does not take a comma separating J from the position for a decimal comma', () => {
    const r = parseLineList('R,0,2906.25');
    expect(r.lines[0]).toMatchObject({ branch: 'R', J: 0, wavenumber: 2906.25 });
    expect(r.warnings).toEqual([]);
  });
});

describe('parseLineList: problems named by line', () => {
  it('names garbage rows and keeps the good ones', () => {
    const r = parseLineList('R(0) 2906.25\nhello world\nR(1) 2925.9\nR(2) abc\n');
    expect(r.lines.map((l) => l.line)).toEqual([1, 3]);
    expect(r.errors.map((e) => e.line)).toEqual([2, 4]);
    expect(r.errors[0].message).toMatch(/^Line 2: .*hello/);
    expect(r.errors[1].message).toMatch(/^Line 4: .*abc/);
  });

  it('refuses P(0), which does not exist', () => {
    const r = parseLineList('P(0)\t2885.9');
    expect(r.lines).toEqual([]);
    expect(r.errors[0]).toMatchObject({ line: 1 });
    expect(r.errors[0].message).toMatch(/P\(0\)/);
  });

  it('flags a position that looks like m⁻¹, not cm⁻¹', () => {
    const r = parseLineList('R(0)\t290625');
    expect(r.errors[0].message).toMatch(/m⁻¹/);
  });

  it('flags a branch with no J', () => {
    const r = parseLineList('branch\tJ\twavenumber\nR\t\t2906.25');
    expect(r.errors).toHaveLength(1);
    expect(r.errors[0]).toMatchObject({ line: 2 });
    expect(r.errors[0].message).toMatch(/without J/);
  });

  it('reports an empty paste', () => {
    expect(parseLineList('  \n\n').errors[0].message).toMatch(/empty/);
  });

  it('warns when an unrecognised first row is skipped as a heading', () => {
    const r = parseLineList('my peaks\n2906.25');
    expect(r.lines).toHaveLength(1);
    expect(r.warnings[0]).toMatchObject({ line: 1 });
  });
});

describe('parseLineList: size limits', () => {
  it(`stops at once with 10⁵ rows (cap ${LINE_LIST_MAX_ROWS})`, () => {
    const text = 'R(0)\t2906.25\n'.repeat(100_000);
    const t0 = performance.now();
    const r = parseLineList(text);
    const ms = performance.now() - t0;
    expect(r.lines).toEqual([]);
    expect(r.errors).toHaveLength(1);
    expect(r.errors[0].message).toMatch(/more than 2000 rows/);
    expect(ms).toBeLessThan(200);
  });

  it('refuses one enormous row quickly', () => {
    const text = '2906.25 '.repeat(1_000_000);
    const t0 = performance.now();
    const r = parseLineList(text);
    expect(r.errors[0].message).toMatch(/too long/);
    expect(performance.now() - t0).toBeLessThan(200);
  });

  it('accepts exactly the cap', () => {
    const text = '2906.25\n'.repeat(LINE_LIST_MAX_ROWS);
    const r = parseLineList(text);
    expect(r.errors).toEqual([]);
    expect(r.lines).toHaveLength(LINE_LIST_MAX_ROWS);
  });
});

describe('formatLineListCsv', () => {
  it('writes CSV that parseLineList reads back unchanged, assigned and unassigned', () => {
    const lines = [
      { branch: 'P' as const, J: 3, wavenumber: 2843.625 },
      { branch: 'R' as const, J: 0, wavenumber: 2906.2 },
      { wavenumber: 2500.125 },
    ];
    const csv = formatLineListCsv(lines);
    expect(csv.split('\n')[0]).toBe('branch,J,wavenumber (cm-1)');
    const back = parseLineList(csv);
    expect(back.errors).toEqual([]);
    expect(back.warnings).toEqual([]);
    expect(back.lines.map(({ branch, J, wavenumber }) => ({ branch, J, wavenumber }))).toEqual([
      { branch: 'P', J: 3, wavenumber: 2843.625 },
      { branch: 'R', J: 0, wavenumber: 2906.2 },
      { branch: undefined, J: undefined, wavenumber: 2500.125 },
    ]);
  });
});

describe('parseLineList: hostile rows stay fast', () => {
  it.each([
    ['a cell of 100 000 spaces', `branch\tJ\twavenumber\nR\t0\t1${' '.repeat(100_000)}x`],
    ['a label-like token with long digit and space runs', `P(${'1'.repeat(50_000)}${' '.repeat(50_000)}x`],
    ['a tab-separated cell of 150 000 words', `R\t0\t${'2906.25 '.repeat(150_000).slice(0, 390_000)}`],
  ])('names the bad row in %s within a second', (_name, text) => {
    const t0 = performance.now();
    const r = parseLineList(text);
    expect(r.lines).toEqual([]);
    expect(r.errors.length).toBeGreaterThan(0);
    expect(performance.now() - t0).toBeLessThan(1000);
  });
});

describe('parseLineList: files from real instruments and other languages', () => {
  // Positions are illustrative H³⁵Cl values (from memory, common practice); conversions by
  // ν̃/cm⁻¹ = 10⁴/(λ/µm) = 10⁷/(λ/nm), the definition of the wavenumber.
  it('keeps a quoted decimal comma in a comma-separated row, and reads quoted semicolon rows', () => {
    const a = parseLineList('R,0,"2906,25"\nP,1,"2865,10"');
    expect(a.errors).toEqual([]);
    expect(a.lines.map((l) => [l.branch, l.J, l.wavenumber])).toEqual([
      ['R', 0, 2906.25],
      ['P', 1, 2865.1],
    ]);
    const b = parseLineList('"Zweig";"J";"Wellenzahl / cm-1"\n"R";"0";"2906,25"\n"P";"1";"2865,10"');
    expect(b.errors).toEqual([]);
    expect(b.format.header).toBe(true);
    expect(b.lines.map((l) => [l.branch, l.J, l.wavenumber])).toEqual([
      ['R', 0, 2906.25],
      ['P', 1, 2865.1],
    ]);
  });

  it.each([
    ['German', 'Zweig;J;Wellenzahl (cm-1);Intensität\nR;0;2906,25;0,41\nP;1;2865,10;0,44'],
    ['French', "branche,J,nombre d'onde (cm-1),intensité\nR,0,2906.25,0.41\nP,1,2865.10,0.44"],
    ['Spanish', 'rama\tJ\tnúmero de onda (cm-1)\tintensidad\nR\t0\t2906.25\t0.41\nP\t1\t2865.10\t0.44'],
    ['Italian', 'ramo;J;numero d’onda;intensità\nR;0;2906,25;0,41\nP;1;2865,10;0,44'],
  ])('reads a %s header', (_lang, text) => {
    const r = parseLineList(text);
    expect(r.errors).toEqual([]);
    expect(r.warnings.filter((w) => !/decimal comma/i.test(w.message))).toEqual([]);
    expect(r.lines.map((l) => [l.branch, l.J, l.wavenumber])).toEqual([
      ['R', 0, 2906.25],
      ['P', 1, 2865.1],
    ]);
  });

  it('finds the position column of a "peak, intensity, position" table by its range, not its order', () => {
    // Peak numbers 250, 251, 252 lie in the wavenumber range too; they count up by one, so they are not positions.
    const r = parseLineList('250\t0.31\t2906.25\n251\t0.44\t2925.90\n252\t0.12\t2944.91');
    expect(r.errors).toEqual([]);
    expect(r.lines.map((l) => l.wavenumber)).toEqual([2906.25, 2925.9, 2944.91]);
    expect(r.warnings).toEqual([]);
    // With an unfamiliar header the values still decide.
    const h = parseLineList('Nr.;Höhe;Pos.\n250;0,31;2906,25\n251;0,44;2925,90\n252;0,12;2944,91');
    expect(h.lines.map((l) => l.wavenumber)).toEqual([2906.25, 2925.9, 2944.91]);
  });

  it('converts wavelengths in µm or nm when the header says so, and says it did', () => {
    const um = parseLineList('branch\tJ\twavelength (µm)\nR\t0\t3.44086\nP\t1\t3.49028');
    expect(um.errors).toEqual([]);
    expect(um.format.unit).toBe('µm');
    expect(um.lines.map((l) => [l.branch, l.J, Number(l.wavenumber.toFixed(2))])).toEqual([
      ['R', 0, Number((1e4 / 3.44086).toFixed(2))],
      ['P', 1, Number((1e4 / 3.49028).toFixed(2))],
    ]);
    expect(um.warnings[0].message).toMatch(/wavelengths in µm.*converted/);
    const nm = parseLineList('Wellenlänge / nm;Intensität\n3440,86;0,41\n3490,28;0,44');
    expect(nm.errors).toEqual([]);
    expect(nm.format.unit).toBe('nm');
    expect(nm.lines.map((l) => Number(l.wavenumber.toFixed(2)))).toEqual([
      Number((1e7 / 3440.86).toFixed(2)),
      Number((1e7 / 3490.28).toFixed(2)),
    ]);
    // A wavelength header without a unit: µm told from the size of the values.
    const bare = parseLineList('lambda\n3.44086\n3.49028');
    expect(bare.format.unit).toBe('µm');
    expect(bare.warnings[0].message).toMatch(/read from their size/);
  });

  it('refuses wavelengths given without a unit: "these look like wavelengths"', () => {
    const um = parseLineList('R(0)\t3.44086\nR(1)\t3.41764\nP(1)\t3.49028');
    expect(um.lines).toEqual([]);
    expect(um.errors).toHaveLength(1);
    expect(um.errors[0].message).toMatch(/^These look like wavelengths in µm \(3\.44086, 3\.41764, 3\.49028\)/);
    expect(um.errors[0].message).toMatch(/wavelength \(µm\)/);
    // In nm the values could be wavenumbers; the practical's range (the H³⁵Cl/H³⁷Cl fundamental, 2500–3150 cm⁻¹) tells them apart.
    const nm = parseLineList('3440.86\n3417.64\n3490.28', { expected: { from: 2500, to: 3150 } });
    expect(nm.lines).toEqual([]);
    expect(nm.errors[0].message).toMatch(/^These look like wavelengths in nm/);
    // The same numbers without the practical's range are read as they are.
    expect(parseLineList('3440.86\n3417.64\n3490.28').errors).toEqual([]);
    // And real wavenumbers inside the range are never taken for wavelengths.
    expect(parseLineList('2906.25\n2925.9\n2865.1', { expected: { from: 2500, to: 3150 } }).errors).toEqual([]);
  });
});
