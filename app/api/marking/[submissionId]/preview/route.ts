import fs from 'node:fs/promises';
import { route, idParam } from '@/lib/http';
import { authorizeSubmission } from '@/lib/authz/submission';
import { loadMarkingView } from '@/lib/marking/view';
import { feedbackInputFromView } from '@/lib/marking/feedback-input';
import { buildFeedbackPdf } from '@/lib/pdf/feedback';
import { feedbackPath } from '@/lib/storage';
import { models } from '@/models';

type Ctx = { params: Promise<{ submissionId: string }> };

/** Staff: the released feedback PDF, or (before release) a preview built from the current marks. */
export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).submissionId);
  await authorizeSubmission(request, id, 'submission-mark');
  const doc = await models().FeedbackDocument.findOne({ where: { submissionId: id }, order: [['id', 'DESC']] });
  const pdf = doc
    ? new Uint8Array(await fs.readFile(feedbackPath(doc.storedName)))
    : await buildFeedbackPdf(feedbackInputFromView(await loadMarkingView(id)));
  return new Response(pdf as BodyInit, {
    headers: {
      'Content-Type': 'application/pdf',
      'Content-Disposition': `inline; filename="feedback-${id}.pdf"`,
      'Cache-Control': 'private, no-store',
      'X-Content-Type-Options': 'nosniff',
      // The full policy comes from next.config.mjs (user files); this is the same, for any other server.
      'Content-Security-Policy': "sandbox; default-src 'none'; object-src 'none'; frame-ancestors 'none'",
    },
  });
});
