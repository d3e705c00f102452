import { signInSchema } from '@/lib/schemas/auth';

/** The "forgot your password?" form: the same e-mail rule as sign-in, checked in the browser and by the route. */
export const resetRequestSchema = signInSchema.pick({ email: true }).strict();
export type ResetRequestInput = { email: string };
