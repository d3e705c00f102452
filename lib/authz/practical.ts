/**
 * Loaders for the course set-up routes: sign-in first (401), then the row (404), then
 * course-manage on the course that row belongs to (403). The course is always taken from the
 * database, never from the URL or body.
 */
import 'server-only';
import { practicalOr404 } from '@/lib/instructor/practicals';
import { authenticate, permit, type Actor } from './index';

export async function authorizeManageOf<T>(
  request: Request,
  load: () => Promise<T>,
  courseIdOf: (row: T) => number,
): Promise<{ actor: Actor; row: T }> {
  const actor = await authenticate(request);
  const row = await load();
  permit(actor, { kind: 'course-manage', courseId: courseIdOf(row) });
  return { actor, row };
}

export const authorizePractical = (request: Request, practicalId: number) =>
  authorizeManageOf(
    request,
    () => practicalOr404(practicalId),
    (p) => p.courseId,
  ).then(({ actor, row }) => ({ actor, practical: row }));
