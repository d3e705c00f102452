import fs from 'node:fs';
import { z } from 'zod';
import { HttpError, json, route, validate } from '@/lib/http';
import { authorize, permit } from '@/lib/authz';
import { sequelize } from '@/lib/db';
import { sampleKeySchema, UPLOAD_KINDS } from '@/lib/schemas/submission';
import { scopeOf } from '@/lib/authz/submission';
import { readDraft } from '@/lib/submissions/service';
import { analyseFile, samplesForPractical } from '@/lib/submissions/spectra';
import { acceptFile, receiveMultipart, uploadLimits } from '@/lib/submissions/uploads';
import { uploadPath } from '@/lib/storage';
import { models } from '@/models';

const fieldsSchema = z.object({
  submissionId: z.coerce.number().int().positive(),
  kind: z.enum(UPLOAD_KINDS),
  /** Which of the practical's spectra (when it takes one per sample); the first when omitted. */
  sample: sampleKeySchema.optional(),
});

/**
 * Upload a spectrum or the report PDF to the student's own draft (multipart: submissionId, kind,
 * file, and for a spectrum optionally sample). A spectrum is analysed once, here, and the analysis
 * kept with the upload.
 */
export const POST = route(async (request) => {
  const actor = await authorize(request, { kind: 'signed-in' });
  const limits = uploadLimits();
  const received = await receiveMultipart(request, Math.max(limits.spectrum, limits.report));
  let finalPath: string | null = null;
  try {
    const fields = validate(fieldsSchema, received.fields);
    if (!received.file) throw new HttpError(400, 'No file was sent.');
    const { Submission, Upload } = models();
    const draftRow = await Submission.findByPk(fields.submissionId);
    if (!draftRow) throw new HttpError(404, 'No such submission.');
    const { practical, scope } = await scopeOf(draftRow);
    permit(actor, { kind: 'submission-write', ...scope });
    if (draftRow.attempt !== 0) throw new HttpError(409, 'Files can only be added to your draft, not to a submitted attempt.');
    const samples = fields.kind === 'spectrum' ? await samplesForPractical(practical) : [];
    const sample = fields.kind === 'spectrum' ? (fields.sample ? samples.find((x) => x.key === fields.sample) : samples[0]) : undefined;
    if (fields.kind === 'spectrum' && !sample)
      throw new HttpError(
        400,
        `This practical takes no spectrum called "${fields.sample}"; it takes ${samples.map((x) => `"${x.key}"`).join(', ')}.`,
      );
    const accepted = await acceptFile(received.file, fields.kind);
    finalPath = accepted.finalPath;
    // Analysed before the transaction, so the database is not held while it runs.
    const analysis = sample ? analyseFile(accepted, 0, sample) : null;
    const upload = await sequelize().transaction(async (transaction) => {
      const up = await Upload.create(
        {
          ownerId: actor.id,
          submissionId: draftRow.id,
          kind: fields.kind,
          originalName: accepted.originalName,
          storedName: accepted.storedName,
          sha256: accepted.sha256,
          size: accepted.size,
          contentType: accepted.contentType,
          sample: sample?.key ?? null,
        },
        { transaction },
      );
      if (analysis)
        await up.update(
          { analysis: JSON.parse(JSON.stringify({ ...analysis, uploadId: up.id })) as Record<string, unknown> },
          { transaction },
        );
      const fresh = await Submission.findByPk(draftRow.id, { transaction });
      const draft = readDraft(fresh!.draft, practical.species);
      let previous: number | null;
      if (fields.kind === 'report') {
        previous = draft.reportUploadId;
        draft.reportUploadId = up.id;
      } else if (sample === samples[0]) {
        previous = draft.spectrumUploadId;
        draft.spectrumUploadId = up.id;
      } else {
        previous = draft.spectra?.[sample!.key] ?? null;
        draft.spectra = { ...(draft.spectra ?? {}), [sample!.key]: up.id };
      }
      await fresh!.update({ draft, version: fresh!.version + 1 }, { transaction });
      // A replaced file that belonged only to the draft is removed.
      if (previous !== null) {
        const old = await Upload.findByPk(previous, { transaction });
        if (old && old.submissionId === draftRow.id) {
          await old.destroy({ transaction });
          fs.rmSync(uploadPath(old.storedName), { force: true });
        }
      }
      return { up, version: fresh!.version };
    });
    finalPath = null;
    return json(
      {
        id: upload.up.id,
        kind: upload.up.kind,
        sample: upload.up.sample,
        originalName: upload.up.originalName,
        size: upload.up.size,
        version: upload.version,
        warnings: accepted.warnings,
      },
      201,
    );
  } finally {
    received.cleanup();
    if (finalPath) fs.rmSync(finalPath, { force: true });
  }
});
