/**
 * What the student's form needs about the practical's spectra: the samples with what each is
 * expected to hold, the names of the spectra uploaded so far, and where the practical's bands lie
 * (so a line list in nm is recognised).
 */
import { isotopologuesOfAll, predictBand, BAND_LABEL } from '@/lib/spectrum';
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Draft } from '@/lib/schemas/submission';
import { samplesForPractical } from './spectra';

const list = (xs: string[]) => (xs.length <= 1 ? xs.join('') : `${xs.slice(0, -1).join(', ')} and ${xs[xs.length - 1]}`);

export async function spectrumFormProps(practical: Practical, draft: Draft) {
  const samples = await samplesForPractical(practical);
  const { Upload } = models();
  const name = async (id: number | null | undefined) => (id ? ((await Upload.findByPk(id))?.originalName ?? null) : null);
  const spectrumNames: Record<string, string | null> = {};
  for (const [i, s] of samples.entries()) spectrumNames[s.key] = await name(i === 0 ? draft.spectrumUploadId : draft.spectra?.[s.key]);
  let from = Infinity;
  let to = -Infinity;
  for (const s of samples) {
    for (const iso of isotopologuesOfAll(s.molecules).isotopologues) {
      for (const band of s.bands) {
        const p = predictBand(iso, band);
        if (!p || p.lines.length === 0) continue;
        from = Math.min(from, p.lines[0].wavenumber);
        to = Math.max(to, p.lines[p.lines.length - 1].wavenumber);
      }
    }
  }
  return {
    samples: samples.map((s) => ({
      key: s.key,
      label: s.label,
      holds: `${list(s.molecules)}: ${s.bands.map((b) => BAND_LABEL[b]).join(', ')}`,
    })),
    spectrumNames,
    expectedRange: Number.isFinite(from) ? { from: Math.floor(from), to: Math.ceil(to) } : undefined,
  };
}
