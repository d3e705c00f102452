/**
 * The spectra of a submission and their analyses, from the database: which spectra the practical
 * takes, which upload is which, and the analysis of each (made when it was uploaded; made now
 * and kept when it is missing or was made for other molecules or bands).
 */
import type { Transaction } from 'sequelize';
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Submission } from '@/models/submission';
import type { Upload } from '@/models/upload';
import { readDraft } from './draft';
import { loadSpectrum } from './load-spectrum';
import {
  analyseForSample,
  ANALYSIS_VERSION,
  isCurrent,
  OVERTONE_QUANTITIES,
  samplesOf,
  type SpectrumSample,
  type StoredAnalysis,
} from './spectrum-analysis';

export async function samplesForPractical(
  practical: Pick<Practical, 'id' | 'species' | 'spectrumSamples'>,
  transaction?: Transaction,
): Promise<SpectrumSample[]> {
  const overtone =
    (await models().QuantityDefinition.count({ where: { practicalId: practical.id, key: [...OVERTONE_QUANTITIES] }, transaction })) > 0;
  return samplesOf(practical, overtone);
}

/** The sample an uploaded spectrum belongs to (an upload from before samples existed is the first). */
export function sampleOf(upload: Pick<Upload, 'sample'>, samples: SpectrumSample[]): SpectrumSample {
  return samples.find((s) => s.key === upload.sample) ?? samples[0];
}

/** Analyses a spectrum file already stored (for an upload being created, or one without a current analysis). */
export function analyseFile(file: { storedName: string; originalName: string }, uploadId: number, sample: SpectrumSample): StoredAnalysis {
  const loaded = loadSpectrum(file);
  if (!loaded.ok)
    return {
      version: ANALYSIS_VERSION,
      ok: false,
      uploadId,
      sample: sample.key,
      molecules: sample.molecules,
      bands: sample.bands,
      message: loaded.message,
    };
  return analyseForSample(loaded.spectrum, uploadId, sample);
}

/** The upload's analysis for this sample, made and kept now if it is missing or stale. */
export async function analysisOfUpload(upload: Upload, sample: SpectrumSample, transaction?: Transaction): Promise<StoredAnalysis> {
  if (isCurrent(upload.analysis, upload.id, sample)) return upload.analysis as unknown as StoredAnalysis;
  const analysis = analyseFile(upload, upload.id, sample);
  await upload.update({ analysis: JSON.parse(JSON.stringify(analysis)) as Record<string, unknown> }, { transaction });
  return analysis;
}

export interface SubmissionSpectrum {
  sample: SpectrumSample;
  upload: Upload | null;
  analysis: StoredAnalysis | null;
}

/**
 * Each spectrum the practical takes, with the submission's upload for it and that upload's
 * analysis. A draft names its uploads in the draft; a submitted attempt owns them.
 */
export async function spectraOfSubmission(
  submission: Submission,
  practical: Practical,
  options: { transaction?: Transaction; analyse?: boolean } = {},
): Promise<SubmissionSpectrum[]> {
  const { transaction } = options;
  const { Upload } = models();
  const samples = await samplesForPractical(practical, transaction);
  const uploads = new Map<string, Upload>();
  if (submission.attempt === 0) {
    const draft = readDraft(submission.draft, practical.species);
    const ids: [string, number | null][] = [[samples[0].key, draft.spectrumUploadId], ...Object.entries(draft.spectra ?? {})];
    for (const [key, id] of ids) {
      if (id === null || id === undefined || uploads.has(key)) continue;
      const up = await Upload.findByPk(id, { transaction });
      if (up && up.ownerId === submission.studentId && up.kind === 'spectrum') uploads.set(key, up);
    }
  } else {
    const rows = await Upload.findAll({ where: { submissionId: submission.id, kind: 'spectrum' }, order: [['id', 'DESC']], transaction });
    for (const up of rows) {
      const key = sampleOf(up, samples).key;
      if (!uploads.has(key)) uploads.set(key, up);
    }
  }
  const out: SubmissionSpectrum[] = [];
  for (const sample of samples) {
    const upload = uploads.get(sample.key) ?? null;
    const analysis = upload && options.analyse !== false ? await analysisOfUpload(upload, sample, transaction) : null;
    out.push({ sample, upload, analysis });
  }
  return out;
}
