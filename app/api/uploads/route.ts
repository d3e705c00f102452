import fs from 'node:fs';
import { z } from 'zod';
import { HttpError, json, route, validate } from '@/lib/http';
import { authorize, permit } from '@/lib/authz';
import { sequelize } from '@/lib/db';
import { UPLOAD_KINDS } from '@/lib/schemas/submission';
import { scopeOf } from '@/lib/submissions/access';
import { readDraft } from '@/lib/submissions/service';
import { acceptFile, receiveMultipart, uploadLimits } from '@/lib/submissions/uploads';
import { uploadPath } from '@/lib/storage';
import { models } from '@/models';

const fieldsSchema = z.object({
  submissionId: z.coerce.number().int().positive(),
  kind: z.enum(UPLOAD_KINDS),
});

/** Upload a spectrum or the report PDF to the student's own draft (multipart: submissionId, kind, file). */
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
    const accepted = await acceptFile(received.file, fields.kind);
    finalPath = accepted.finalPath;
    const upload = await sequelize().transaction(async (transaction) => {
      const up = await Upload.create(
        { ownerId: actor.id, submissionId: draftRow.id, kind: fields.kind, originalName: accepted.originalName, storedName: accepted.storedName, sha256: accepted.sha256, size: accepted.size, contentType: accepted.contentType },
        { transaction },
      );
      const fresh = await Submission.findByPk(draftRow.id, { transaction });
      const draft = readDraft(fresh!.draft, practical.species);
      const field = fields.kind === 'spectrum' ? 'spectrumUploadId' : 'reportUploadId';
      const previous = draft[field];
      draft[field] = up.id;
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
    return json({ id: upload.up.id, kind: upload.up.kind, originalName: upload.up.originalName, size: upload.up.size, version: upload.version, warnings: accepted.warnings }, 201);
  } finally {
    received.cleanup();
    if (finalPath) fs.rmSync(finalPath, { force: true });
  }
});
