/**
 * Forms of the learning-platform screens (administration and the course's platform page). The
 * same schemas check the forms in the browser and the bodies of the route handlers.
 */
import './jitless';
import { z } from 'zod';
import { isAcceptablePlatformUrl } from '@/lib/lti/config';

const id = z.number().int().positive().max(Number.MAX_SAFE_INTEGER);
const text = (max: number) => z.string().trim().min(1, 'Required.').max(max, `At most ${max} characters.`);
const platformUrl = text(1000).refine(
  isAcceptablePlatformUrl,
  'An https address (http only on this machine, for the local fake platform).',
);

export const registrationSchema = z.object({
  name: text(200),
  issuer: text(500).refine(
    (v) => isAcceptablePlatformUrl(v),
    'The issuer is the platform’s https address, exactly as it puts it in its tokens.',
  ),
  clientId: text(255),
  deploymentIds: z.array(text(255)).min(1, 'At least one deployment id.').max(20, 'At most 20 deployment ids.'),
  authLoginUrl: platformUrl,
  authTokenUrl: platformUrl,
  keySetUrl: platformUrl,
  tokenAudience: z
    .union([
      z.literal(''),
      text(1000).refine(
        (v) => /^https?:\/\/[^\s]+$/.test(v) && URL.canParse(v),
        'An address (the audience the platform expects in token requests).',
      ),
    ])
    .optional(),
  active: z.boolean().optional(),
});
export type RegistrationInput = z.infer<typeof registrationSchema>;

export const registrationUpdateSchema = registrationSchema.partial();

export const contextCreateSchema = z.object({
  registrationId: id,
  contextId: text(255),
  courseId: id,
  defaultCohortId: id.nullable().optional(),
});

export const contextUpdateSchema = z.object({
  defaultCohortId: id.nullable(),
});

export const rosterConfirmSchema = z.object({
  fingerprint: z.string().regex(/^[0-9a-f]{32}$/, 'Preview the roster first.'),
});
