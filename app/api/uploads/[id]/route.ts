import fs from 'node:fs';
import { authenticate, permit } from '@/lib/authz';
import { HttpError, idParam, route } from '@/lib/http';
import { uploadPath } from '@/lib/storage';
import { scopeOf } from '@/lib/authz/submission';
import { models } from '@/models';

type Ctx = { params: Promise<{ id: string }> };

/** An uploaded file, only for people who may read the submission it belongs to. */
export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).id);
  const actor = await authenticate(request);
  const { Upload, Submission } = models();
  const upload = await Upload.findByPk(id);
  if (!upload) throw new HttpError(404, 'No such file.');
  const sub = upload.submissionId ? await Submission.findByPk(upload.submissionId) : null;
  if (sub) {
    const { scope } = await scopeOf(sub);
    permit(actor, { kind: 'submission-read', ...scope });
  } else if (actor.id !== upload.ownerId) {
    throw new HttpError(403, 'You do not have permission for this.');
  }
  let bytes: Buffer;
  try {
    bytes = fs.readFileSync(uploadPath(upload.storedName));
  } catch {
    throw new HttpError(404, 'The file is missing from storage.');
  }
  const pdf = upload.contentType === 'application/pdf';
  const safeName = upload.originalName.replace(/[^A-Za-z0-9._ -]/g, '_');
  return new Response(new Uint8Array(bytes), {
    headers: {
      'Content-Type': pdf ? 'application/pdf' : 'text/plain; charset=utf-8',
      'Content-Disposition': `${pdf ? 'inline' : 'attachment'}; filename="${safeName}"; filename*=UTF-8''${encodeURIComponent(upload.originalName)}`,
      'X-Content-Type-Options': 'nosniff',
      'Content-Security-Policy': "sandbox; default-src 'none'; object-src 'none'; frame-ancestors 'self'",
      'Cache-Control': 'private, no-store',
    },
  });
});
