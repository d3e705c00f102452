/**
 * Benchmark of the grading engine: a mixed batch of 10,000 submissions, each with a
 * 40-line fit, checked by checkSubmission; compared with a bare loop doing only
 * k = 4π²c²ν̃²μ on the same inputs, measured in the same run.
 *
 * Run: npx tsx scripts/bench-grading.ts   (npm run bench:grading)
 * Options (environment): BENCH_N (batch size, default 10000), BENCH_REPS (timed passes, default 7).
 *
 * Method, so that the numbers survive a busy machine:
 *   - the batch is built first (not timed), then one full untimed pass warms up the JIT;
 *   - the batch is then checked BENCH_REPS times; each pass is timed on its own and the
 *     median (and the minimum, the least disturbed pass) is reported;
 *   - the bare loop is timed the same way, each repetition running the loop enough times
 *     to last a few milliseconds, and its result is accumulated into a checksum that is
 *     printed, so the arithmetic cannot be optimised away;
 *   - the process's CPU time per pass (process.cpuUsage) is reported beside the wall-clock
 *     time: it leaves out the time the process waits for a core, so it is the steadier figure
 *     on a loaded machine (it does include V8's helper threads, e.g. concurrent GC);
 *   - the load average and core count are printed: with a load above the core count the
 *     wall-clock timings are disturbed by other processes and only the minimum is a fair estimate.
 */
import os from 'node:os';
import { checkSubmission, simulateLineList, parseSpecies, forceConstantFromBand, c, type SubmissionInput } from '../lib/grading';

const N = Number(process.env.BENCH_N ?? 10_000);
const REPS = Math.max(1, Number(process.env.BENCH_REPS ?? 7));
const SPECIES = ['H35Cl', 'D35Cl', 'H37Cl', 'H79Br', '12C16O', 'H19F'];
let seed = 2024;
const rnd = () => (seed = (seed * 16807) % 2147483647) / 2147483647;

function makeBatch(): { inputs: SubmissionInput[]; nu: Float64Array; mu: Float64Array } {
  const inputs: SubmissionInput[] = [];
  const nu = new Float64Array(N);
  const mu = new Float64Array(N);
  const lineSets = new Map(SPECIES.map((s) => [s, simulateLineList(s, { jMax: 19 }).slice(0, 40)]));
  for (let i = 0; i < N; i++) {
    const sp = SPECIES[i % SPECIES.length];
    const parsed = parseSpecies(sp);
    if (!parsed.ok) throw new Error(parsed.message);
    const lines = lineSets.get(sp)!.map((l) => ({ branch: l.branch, J: l.J, wavenumber: l.wavenumber + (rnd() - 0.5) * 0.1 }));
    const nu0 = lines.find((l) => l.branch === 'R' && l.J === 0)!.wavenumber - 20 * rnd();
    nu[i] = nu0 * 100;
    mu[i] = parsed.species.reducedMassKg;
    const k = forceConstantFromBand(nu[i], mu[i]);
    // A mix: right answers, slips (factor 1e-4, mass numbers), wrong units, sig-fig problems.
    const kind = i % 5;
    const kReported = kind === 1 ? k * 1e-4 : kind === 2 ? k * 0.9925 : k;
    inputs.push({
      species: sp,
      measured: { bandCentre: { value: nu0.toFixed(2), unit: 'cm-1', uncertainty: 0.05 }, lines },
      reported: {
        bandCentre: { value: nu0.toFixed(2), unit: 'cm-1', uncertainty: 0.05 },
        reducedMass: { value: parsed.species.reducedMassU.toPrecision(6), unit: 'u' },
        forceConstant: { value: kReported.toPrecision(kind === 3 ? 9 : 4), unit: kind === 4 ? 'mdyn/Å' : 'N/m' },
        B0: { value: '10.44', unit: 'cm-1' },
        re: { value: '1.2746', unit: 'Å' },
      },
      tolerances: {
        bandCentre: { absolute: 2, unit: 'cm-1' },
        forceConstant: { relative: 0.01, partial: { relative: 0.03 } },
        B0: { relative: 0.01 },
        re: { absolute: 0.002, unit: 'Å' },
      },
    });
  }
  return { inputs, nu, mu };
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

const { inputs, nu, mu } = makeBatch();

/** One pass over the batch; returns the number of slips named (consumed by the caller). */
function checkBatch(): number {
  let diagnosed = 0;
  for (let i = 0; i < N; i++) {
    const r = checkSubmission(inputs[i]);
    for (const q of r.quantities) diagnosed += q.diagnoses.length;
  }
  return diagnosed;
}

const FOUR_PI2_C2 = 4 * Math.PI * Math.PI * c * c;
/** The bare arithmetic k = 4π²c²ν̃²μ over the same inputs; the sum is returned and printed. */
function bareBatch(): number {
  let s = 0;
  for (let i = 0; i < N; i++) s += FOUR_PI2_C2 * nu[i] * nu[i] * mu[i];
  return s;
}

const load0 = os.loadavg();

// Warm-up: one full untimed pass of each loop, so both are optimised before timing.
let diagnosedTotal = checkBatch();
let sink = 0;
for (let r = 0; r < 200; r++) sink += bareBatch();

const fullUs: number[] = [];
const fullCpuUs: number[] = [];
for (let rep = 0; rep < REPS; rep++) {
  const t = performance.now();
  const cpu = process.cpuUsage();
  diagnosedTotal += checkBatch();
  const used = process.cpuUsage(cpu);
  fullUs.push(((performance.now() - t) * 1000) / N);
  fullCpuUs.push((used.user + used.system) / N);
}

const bareNs: number[] = [];
const BARE_INNER = Math.max(1, Math.ceil(2_000_000 / N)); // ≈ 2·10⁶ evaluations per repetition
for (let rep = 0; rep < REPS; rep++) {
  const t = performance.now();
  for (let r = 0; r < BARE_INNER; r++) sink += bareBatch();
  bareNs.push(((performance.now() - t) * 1e6) / (N * BARE_INNER));
}

const load1 = os.loadavg();
const usMed = median(fullUs);
const usMin = Math.min(...fullUs);
const nsMed = median(bareNs);
const nsMin = Math.min(...bareNs);
const fmtLoad = (l: number[]) => l.map((x) => x.toFixed(2)).join(' ');

console.log(`grading benchmark: ${N} submissions, 40-line fit each, mixed right answers and slips`);
console.log(
  `  machine: ${os.cpus().length} cores, load average (1/5/15 min) ${fmtLoad(load0)} before, ${fmtLoad(load1)} after; node ${process.version}`,
);
console.log(`  ${REPS} timed passes after 1 warm-up pass; median (min) of the passes`);
console.log(
  `  checkSubmission: ${(1e6 / usMed).toFixed(0)} (${(1e6 / usMin).toFixed(0)}) submissions/s, ${usMed.toFixed(1)} (${usMin.toFixed(1)}) µs per submission (target < 100 µs)`,
);
console.log(`    passes, µs/submission: ${fullUs.map((x) => x.toFixed(1)).join(' ')}`);
console.log(`  checkSubmission CPU time: ${median(fullCpuUs).toFixed(1)} (${Math.min(...fullCpuUs).toFixed(1)}) µs per submission`);
console.log(`  bare k = 4π²c²ν̃²μ loop: ${nsMed.toFixed(2)} (${nsMin.toFixed(2)}) ns per submission`);
console.log(
  `  ratio full check / bare arithmetic: ${((usMed * 1000) / nsMed).toFixed(0)}× (${((usMin * 1000) / nsMin).toFixed(0)}× min/min)`,
);
console.log(`  (${diagnosedTotal} slips named over ${REPS + 1} passes; checksum ${sink.toExponential(3)})`);
if (load0[0] > os.cpus().length)
  console.log(
    `  note: the 1-minute load (${load0[0].toFixed(1)}) exceeds the core count; other processes share the CPU, so trust the minimum more than the median.`,
  );
