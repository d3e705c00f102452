/** Query strings of the statistics routes, parsed by the routes before they authorise. */
import './jitless';
import { z } from 'zod';

/** `?cohortId=`: one cohort, or (absent) every cohort of the practical. */
export const cohortQuery = z.object({
  cohortId: z
    .string()
    .regex(/^\d{1,12}$/, 'cohortId must be a positive whole number.')
    .transform(Number)
    .optional(),
});

/** `?by=`: what the comparison puts side by side. */
export const compareQuery = z.object({ by: z.enum(['cohort', 'instrument']).default('cohort') });

/** The named query parameters of a request URL, absent ones left out (so zod's defaults apply). */
export function queryParams(request: Request, ...names: string[]): Record<string, string | undefined> {
  const search = new URL(request.url).searchParams;
  return Object.fromEntries(names.map((n) => [n, search.get(n) ?? undefined]));
}
