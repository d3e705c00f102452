/**
 * Benchmark of the whole-spectrum analysis on an upload: a 32,000-point JCAMP-DX file of an
 * HCl/DCl cell (1900–5900 cm⁻¹ at 0.125 cm⁻¹, both fundamentals and both first overtones of
 * all four chlorine isotopologues), read as an upload is read (sniffUpload + parseSpectrumFile)
 * and analysed by analyseSpectrum; compared with the bare parse of the same file, measured in
 * the same run.
 *
 * Run: npx tsx scripts/bench-spectrum.ts   (npm run bench:spectrum)
 * Options (environment): BENCH_REPS (timed passes, default 15).
 *
 * Method (as bench-grading.ts): the file is built first (not timed); two untimed passes warm up
 * the JIT; then each pass is timed on its own and the median and minimum are printed, with the
 * process's CPU time beside the wall-clock time (it leaves out time spent waiting for a core on
 * a busy machine). Peak resident memory is the process's maximum RSS (process.resourceUsage).
 * Target: analysis under 250 ms median.
 */
import os from 'node:os';
import { analyseSpectrum, isotopologuesOf, predictBand, type BandKind } from '../lib/spectrum';
import { parseSpectrumFile } from '../lib/spectrum/parse';
import { sniffUpload } from '../lib/spectrum/sniff';
import { synthesizeSpectrum, type SynthesisLine } from '../lib/spectrum/synthesize';
import { toJcampDx } from '../lib/spectrum/jcamp-write';

const REPS = Math.max(3, Number(process.env.BENCH_REPS ?? 15));

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

/** The cell: HCl and DCl, fundamentals and overtones (the overtones some 35 times weaker), fictional data. */
function buildFile(): string {
  const lines: SynthesisLine[] = [];
  const strength: Record<BandKind, number> = { fundamental: 1, overtone: 0.03 };
  for (const molecule of ['HCl', 'DCl']) {
    const isos = isotopologuesOf(molecule);
    if (!isos.ok) throw new Error(isos.message);
    for (const iso of isos.isotopologues) {
      for (const band of ['fundamental', 'overtone'] as BandKind[]) {
        const p = predictBand(iso, band);
        if (!p) continue;
        for (const l of p.lines)
          lines.push({ wavenumber: l.wavenumber + 3.5, intensity: l.intensity * strength[band] * (molecule === 'DCl' ? 0.8 : 1) });
      }
    }
  }
  const spectrum = synthesizeSpectrum({
    lines,
    from: 1900,
    to: 5900,
    step: 0.125,
    instrument: { resolution: 0.5, apodization: 'happ-genzel', lineWidth: 0.15 },
    peakAbsorbance: 0.8,
    baseline: 0.03,
    baselineSlope: 1e-5,
    noise: 3e-4,
    seed: 32000,
    yKind: 'transmittance',
    title: 'SYNTHETIC HCl + DCl cell, benchmark - not measured',
  });
  return toJcampDx(spectrum, { title: spectrum.title, notes: ['SYNTHETIC SPECTRUM for the benchmark, not a measurement.'] });
}

const text = buildFile();
const bytes = new TextEncoder().encode(text);

function parseOnce() {
  const sniff = sniffUpload(bytes, 'cell.jdx');
  if (sniff.kind !== 'jcamp') throw new Error(sniff.problems.join(' '));
  const parsed = parseSpectrumFile(text, 'jcamp');
  if (!parsed.ok) throw new Error(parsed.message);
  return parsed.spectrum;
}

let bands = 0;
function parseAndAnalyse() {
  const a = analyseSpectrum(parseOnce(), { species: ['HCl', 'DCl'] });
  bands += a.bands.filter((b) => b.status === 'fitted').length;
  return a;
}

const load0 = os.loadavg();
const points = parseOnce().x.length;
const first = parseAndAnalyse(); // warm-up
parseAndAnalyse();

const time = (f: () => unknown) => {
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < REPS; r++) {
    const t = performance.now();
    const c = process.cpuUsage();
    f();
    const used = process.cpuUsage(c);
    wall.push(performance.now() - t);
    cpu.push((used.user + used.system) / 1000);
  }
  return { wall, cpu };
};

const parse = time(parseOnce);
const full = time(parseAndAnalyse);
const load1 = os.loadavg();
const analysisOnly = full.wall.map((w) => w - median(parse.wall));

const fmt = (x: number) => x.toFixed(1);
const fmtLoad = (l: number[]) => l.map((x) => x.toFixed(2)).join(' ');
const peakRssMb = process.resourceUsage().maxRSS / 1024;

console.log(
  `spectrum benchmark: ${points} points (${(bytes.length / 1024).toFixed(0)} KB JCAMP-DX), HCl + DCl, fundamentals and overtones`,
);
console.log(
  `  machine: ${os.cpus().length} cores, load average (1/5/15 min) ${fmtLoad(load0)} before, ${fmtLoad(load1)} after; node ${process.version}`,
);
console.log(`  ${REPS} timed passes after 2 warm-up passes; median (min) of the passes`);
console.log(
  `  bare parse (sniff + parse):   ${fmt(median(parse.wall))} (${fmt(Math.min(...parse.wall))}) ms, CPU ${fmt(median(parse.cpu))} ms`,
);
console.log(
  `  parse + analyseSpectrum:      ${fmt(median(full.wall))} (${fmt(Math.min(...full.wall))}) ms, CPU ${fmt(median(full.cpu))} ms`,
);
console.log(`  analysis alone (difference):  ${fmt(median(analysisOnly))} ms median (target < 250 ms)`);
console.log(
  `  ratio parse + analyse / bare parse: ${(median(full.wall) / median(parse.wall)).toFixed(1)}× (${(Math.min(...full.wall) / Math.min(...parse.wall)).toFixed(1)}× min/min)`,
);
console.log(`    passes, ms: ${full.wall.map(fmt).join(' ')}`);
console.log(`  peak resident memory: ${peakRssMb.toFixed(0)} MB`);
console.log(
  `  bands fitted: ${first.bands.filter((b) => b.status === 'fitted').length} of ${first.bands.length} (${bands} over all passes); calibration: ${first.calibration?.message ?? 'none'}`,
);
if (load0[0] > os.cpus().length)
  console.log(
    `  note: the 1-minute load (${load0[0].toFixed(1)}) exceeds the core count; other processes share the CPU, so trust the minimum and the CPU time more than the median.`,
  );
