/**
 * Each instructor launch looks at the platform's roster: when it differs from the course, the
 * instructor lands on the course's learning-platform page with the preview (nothing is written
 * until they confirm); otherwise on the practical. A slow or failing roster never blocks the launch.
 */
import type { LtiContext } from '@/models/lti-context';
import { previewPlatformRoster } from './roster';
import { log } from '@/lib/log';

export async function instructorLandingAfterRoster(ctx: LtiContext, next: string): Promise<string> {
  if (!ctx.membershipsUrl) return next;
  try {
    const preview = await previewPlatformRoster(ctx);
    const { new: added, changed, leaving } = preview.counts;
    if (added + changed + leaving === 0) return next;
    return `/courses/${ctx.courseId}/learning-platform?review=${ctx.id}&next=${encodeURIComponent(next)}`;
  } catch (error) {
    log().warn({ err: error, ltiContextId: ctx.id }, 'roster check at instructor launch failed');
    return next;
  }
}
