import fs from 'node:fs';
import { HttpError, idParam, route } from '@/lib/http';
import { feedbackPath } from '@/lib/storage';
import { authorizeSubmission } from '@/lib/authz/submission';
import { models } from '@/models';

type Ctx = { params: Promise<{ id: string }> };

/** The feedback PDF of a released submission (404 until released). */
export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).id);
  const { actor, submission } = await authorizeSubmission(request, id, 'submission-read');
  const released = submission.releasedAt !== null || submission.status === 'released';
  if (!released && actor.id === submission.studentId) throw new HttpError(404, 'Feedback for this attempt has not been released yet.');
  const doc = await models().FeedbackDocument.findOne({ where: { submissionId: submission.id }, order: [['id', 'DESC']] });
  if (!doc) throw new HttpError(404, 'No feedback document exists for this attempt yet.');
  let bytes: Buffer;
  try {
    bytes = fs.readFileSync(feedbackPath(doc.storedName));
  } catch {
    throw new HttpError(404, 'The feedback document file is missing.');
  }
  return new Response(new Uint8Array(bytes), {
    headers: {
      'Content-Type': 'application/pdf',
      'Content-Disposition': `attachment; filename="feedback-${submission.id}-attempt-${submission.attempt}.pdf"`,
      'X-Content-Type-Options': 'nosniff',
      'Content-Security-Policy': "sandbox; default-src 'none'; object-src 'none'; frame-ancestors 'none'",
      'Cache-Control': 'private, no-store',
    },
  });
});
