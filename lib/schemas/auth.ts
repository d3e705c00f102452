import './jitless';
import { z } from 'zod';

/** The sign-in form's schema: the form and the server validate with the same rules. */
export const signInSchema = z.object({
  email: z.string().trim().toLowerCase().email('Enter an e-mail address.').max(254, 'That e-mail address is too long.'),
  password: z.string().min(1, 'Enter your password.').max(200, 'That password is too long.'),
});
export type SignInInput = z.infer<typeof signInSchema>;

/** Messages shown on the sign-in page; the same for known and unknown accounts. */
export const SIGN_IN_ERRORS: Record<string, string> = {
  CredentialsSignin: 'E-mail or password not recognised.',
  throttled: 'Too many attempts. Wait a few minutes before trying again.',
};

/** The "forgot your password?" form: the same e-mail rule as sign-in, checked in the browser and by the route. */
export const resetRequestSchema = signInSchema.pick({ email: true }).strict();
export type ResetRequestInput = { email: string };
