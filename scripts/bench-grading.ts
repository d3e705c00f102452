/**
 * Benchmark of the grading engine: a mixed batch of 10,000 submissions, each with a
 * 40-line fit, checked by checkSubmission; compared with a bare loop doing only
 * k = 4π²c²ν̃²μ on the same inputs, measured in the same run.
 * Run: npx tsx scripts/bench-grading.ts
 */
import { checkSubmission, simulateLineList, parseSpecies, forceConstantFromBand, c, type SubmissionInput } from '../lib/grading';

const N = 10_000;
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
      tolerances: { bandCentre: { absolute: 2, unit: 'cm-1' }, forceConstant: { relative: 0.01, partial: { relative: 0.03 } }, B0: { relative: 0.01 }, re: { absolute: 0.002, unit: 'Å' } },
    });
  }
  return { inputs, nu, mu };
}

const { inputs, nu, mu } = makeBatch();

// Warm up the JIT on both loops.
for (let i = 0; i < 500; i++) checkSubmission(inputs[i]);

const FOUR_PI2_C2 = 4 * Math.PI * Math.PI * c * c;
let sink = 0;
const bareRuns = 200; // the bare loop is too fast to time once
const t0 = performance.now();
for (let r = 0; r < bareRuns; r++) for (let i = 0; i < N; i++) sink += FOUR_PI2_C2 * nu[i] * nu[i] * mu[i];
const bareMs = (performance.now() - t0) / bareRuns;

let diagnosed = 0;
const t1 = performance.now();
for (let i = 0; i < N; i++) {
  const r = checkSubmission(inputs[i]);
  for (const q of r.quantities) diagnosed += q.diagnoses.length;
}
const fullMs = performance.now() - t1;

const usPer = (fullMs * 1000) / N;
console.log(`grading benchmark: ${N} submissions, 40-line fit each, mixed right answers and slips`);
console.log(`  checkSubmission: ${(N / (fullMs / 1000)).toFixed(0)} submissions/s, ${usPer.toFixed(1)} µs per submission (target < 100 µs)`);
console.log(`  bare k = 4π²c²ν̃²μ loop: ${((bareMs * 1e6) / N).toFixed(2)} ns per submission`);
console.log(`  ratio full check / bare arithmetic: ${(fullMs / bareMs).toFixed(0)}×`);
console.log(`  (${diagnosed} slips named; checksum ${sink.toExponential(3)})`);
