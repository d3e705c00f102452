import fs from 'node:fs/promises';
import { route, idParam, HttpError } from '@/lib/http';
import { authorizeSubmission } from '@/lib/authz/submission';
import { uploadPath } from '@/lib/storage';
import { models } from '@/models';

type Ctx = { params: Promise<{ submissionId: string }> };

/** The student's report PDF, shown inline on the marking screen. */
export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).submissionId);
  await authorizeSubmission(request, id, 'submission-read');
  const upload = await models().Upload.findOne({ where: { submissionId: id, kind: 'report' }, order: [['id', 'DESC']] });
  if (!upload) throw new HttpError(404, 'No report was uploaded.');
  const body = await fs.readFile(uploadPath(upload.storedName)).catch(() => null);
  if (!body) throw new HttpError(404, 'The report file is missing.');
  return new Response(new Uint8Array(body), {
    headers: {
      'Content-Type': 'application/pdf',
      'Content-Disposition': `inline; filename="report-${id}.pdf"`,
      'Cache-Control': 'private, no-store',
      'X-Content-Type-Options': 'nosniff',
      'Content-Security-Policy': "sandbox; default-src 'none'; object-src 'none'; frame-ancestors 'self'",
    },
  });
});
