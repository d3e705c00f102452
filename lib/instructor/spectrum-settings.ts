/**
 * The instructor's settings for spectra: which spectra the practical takes (one cell holding every
 * molecule, or one spectrum per sample with the bands expected in each), and whether the marking
 * screen and the feedback show Oscillab's own reading of the student's spectrum.
 */
import { audit } from '@/lib/audit';
import { sequelize } from '@/lib/db';
import { HttpError } from '@/lib/http';
import type { SpectrumSettingsData } from '@/lib/schemas/instructor';
import { isotopologuesOf } from '@/lib/spectrum';
import type { Practical } from '@/models/practical';
import { moleculeOf } from '@/lib/submissions/spectrum-analysis';
import { samplesForPractical } from '@/lib/submissions/spectra';
import type { Serialized } from '@/lib/serialized';

/** GET and PUT /api/practicals/[id]/spectrum-settings's answer. */
export type SpectrumSettingsView = Serialized<Awaited<ReturnType<typeof spectrumSettings>>>;

export async function spectrumSettings(practical: Practical) {
  return {
    spectrumAnalysis: practical.spectrumAnalysis,
    samples: practical.spectrumSamples ?? null,
    /** What applies now (the default when no samples are set). */
    effective: await samplesForPractical(practical),
  };
}

export async function saveSpectrumSettings(practical: Practical, data: SpectrumSettingsData, actorId: number) {
  const fields: Record<string, string[]> = {};
  if (data.samples) {
    const keys = new Set<string>();
    data.samples.forEach((s, i) => {
      if (keys.has(s.key)) (fields[`samples.${i}.key`] ??= []).push('Two spectra have the same name.');
      keys.add(s.key);
      s.molecules.forEach((m, j) => {
        const r = isotopologuesOf(m);
        if (!r.ok)
          (fields[`samples.${i}.molecules`] ??= []).push(
            `Molecule ${j + 1} of spectrum ${i + 1} (${m}) is not one Oscillab can read: ${r.message}`,
          );
      });
    });
    const held = new Set(data.samples.flatMap((s) => s.molecules.map(moleculeOf)));
    const missing = practical.species.filter((sp) => !held.has(moleculeOf(sp)));
    if (missing.length)
      (fields.samples ??= []).push(`No spectrum holds ${missing.map(moleculeOf).join(', ')}, which this practical's isotopologues need.`);
  }
  if (Object.keys(fields).length) throw new HttpError(400, Object.values(fields)[0][0], fields);
  const before = { spectrumAnalysis: practical.spectrumAnalysis, spectrumSamples: practical.spectrumSamples ?? null };
  const after = {
    spectrumAnalysis: data.spectrumAnalysis,
    spectrumSamples: data.samples
      ? data.samples.map((s) => ({ ...s, molecules: [...new Set(s.molecules)], bands: [...new Set(s.bands)] }))
      : null,
  };
  await sequelize().transaction(async (transaction) => {
    await practical.update(after, { transaction });
    await audit(
      { actorId, action: 'practical.spectrum-settings', entityType: 'practical', entityId: practical.id, before, after },
      transaction,
    );
  });
  return spectrumSettings(practical);
}
