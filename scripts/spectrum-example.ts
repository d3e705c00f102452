/**
 * The worked example of lib/spectrum/README.md: a synthetic HCl + DCl cell (fictional data,
 * made by the project's generator), analysed by analyseSpectrum, printed as a short report.
 *
 *   npx tsx scripts/spectrum-example.ts
 *
 * The README's example block is this script's output; tests/unit/spectrum/readme-example.test.ts
 * checks that they agree.
 */
import { analyseSpectrum, isotopologuesOf, predictBand, type BandKind, type SpectrumAnalysis } from '../lib/spectrum';
import { synthesizeSpectrum, type SynthesisLine } from '../lib/spectrum/synthesize';

/** The cell: HCl and DCl (0.8 as strong), both bands, recorded 4.2 cm⁻¹ high, with one stray line at 2350 cm⁻¹. */
export function exampleSpectrum() {
  const lines: SynthesisLine[] = [];
  for (const molecule of ['HCl', 'DCl']) {
    const isos = isotopologuesOf(molecule);
    if (!isos.ok) throw new Error(isos.message);
    for (const iso of isos.isotopologues) {
      for (const band of ['fundamental', 'overtone'] as BandKind[]) {
        const p = predictBand(iso, band)!;
        const scale = (band === 'overtone' ? 0.03 : 1) * (molecule === 'DCl' ? 0.8 : 1);
        for (const l of p.lines) lines.push({ wavenumber: l.wavenumber + 4.2, intensity: l.intensity * scale });
      }
    }
  }
  lines.push({ wavenumber: 2350, intensity: 0.2 });
  return synthesizeSpectrum({
    lines,
    from: 1900,
    to: 5900,
    step: 0.125,
    instrument: { resolution: 0.5, apodization: 'happ-genzel', lineWidth: 0.15 },
    peakAbsorbance: 0.8,
    baseline: 0.03,
    baselineSlope: 1e-5,
    noise: 3e-4,
    seed: 13,
    yKind: 'transmittance',
    title: 'SYNTHETIC HCl + DCl cell (example)',
  });
}

const f = (e: { value: number; stdError: number } | undefined, digits: number) =>
  e ? `${e.value.toFixed(digits)} ± ${e.stdError.toFixed(digits)}` : '—';

export function exampleReport(a: SpectrumAnalysis = analyseSpectrum(exampleSpectrum(), { species: ['HCl', 'DCl'] })): string {
  const out: string[] = [];
  out.push(`analyseSpectrum(spectrum, { species: ['HCl', 'DCl'] })`);
  out.push(
    `range ${a.range.from}–${a.range.to} cm⁻¹, ${a.range.points} points; line shape: ${a.lineShape.model}, FWHM ${a.lineShape.fwhm.toFixed(3)} cm⁻¹`,
  );
  out.push('');
  for (const b of a.bands) {
    if (!b.fit) {
      out.push(`${b.label}: ${b.status}`);
      continue;
    }
    const k = b.fit;
    out.push(`${b.label}: ${b.lines.length} lines, ${k.model} fit, rms ${k.rms.toFixed(4)} cm⁻¹`);
    out.push(
      `  ν̃₀ ${f(k.nu0, 4)}  B₀ ${f(k.B0, 5)}  B${b.band === 'fundamental' ? '₁' : '₂'} ${f(k.Bupper, 5)}  Bₑ ${f(k.Be, 5)}  αₑ ${f(k.alphaE, 5)}  D ${k.D ? `${(k.D.value * 1e4).toFixed(3)} ± ${(k.D.stdError * 1e4).toFixed(3)} ×10⁻⁴` : '—'}`,
    );
    for (const w of b.warnings) out.push(`  note: ${w}`);
  }
  out.push('');
  out.push(`unassigned: ${a.unassigned.map((u) => `${u.wavenumber.toFixed(2)} cm⁻¹ (A ${u.intensity.toFixed(3)})`).join(', ') || 'none'}`);
  out.push(`calibration: ${a.calibration?.message ?? '—'}`);
  for (const c of a.vibration.combined) {
    const v = c.calibrated ?? c.asRecorded;
    out.push(
      `${c.referenceDisplay} from ${c.isotopologues.length} isotopologues${c.calibrated ? ' (origins corrected for the offset)' : ''}: ωₑ ${f(v.omegaE, 2)}, ωₑxₑ ${f(v.omegaExe, 3)}, ωₑyₑ ${f(v.omegaEye, 4)} cm⁻¹`,
    );
  }
  for (const v of a.vibration.isotopologues) {
    const n = v.calibrated ?? v.asRecorded;
    out.push(
      `${v.display} two-band: ωₑ ${f(n.omegaE, 2)}, ωₑxₑ ${f(n.omegaExe, 3)} cm⁻¹, kₑ ${n.forceConstantE ? f(n.forceConstantE, 2) : '—'} N m⁻¹`,
    );
  }
  out.push('');
  out.push('problems:');
  for (const p of a.problems) out.push(`  ${p}`);
  return out.join('\n');
}

if (process.argv[1] && /spectrum-example\.ts$/.test(process.argv[1])) console.log(exampleReport());
