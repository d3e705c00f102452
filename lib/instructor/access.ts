import { authorize, can, type Actor } from '@/lib/authz';
import { HttpError } from '@/lib/http-error';
import { practicalOr404 } from './practicals';

/**
 * Sign-in first (401), then the row (404), then course-manage on the course that row belongs
 * to (403): the course is always taken from the database, never from the URL or body.
 */
export async function authorizeManageOf<T>(request: Request, load: () => Promise<T>, courseIdOf: (row: T) => number): Promise<{ actor: Actor; row: T }> {
  const actor = await authorize(request);
  const row = await load();
  if (!can(actor, { kind: 'course-manage', courseId: courseIdOf(row) })) throw new HttpError(403, 'You do not have permission for this.');
  return { actor, row };
}

export const authorizePractical = (request: Request, practicalId: number) =>
  authorizeManageOf(request, () => practicalOr404(practicalId), (p) => p.courseId).then(({ actor, row }) => ({ actor, practical: row }));
