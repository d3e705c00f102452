/**
 * The key that signs session cookies. Production must set NEXTAUTH_SECRET (the demo and test
 * scripts do); development falls back to a fixed key so `next dev` works out of the box.
 */
export function sessionSecret(): string {
  const secret = process.env.NEXTAUTH_SECRET;
  if (secret) return secret;
  if (process.env.NODE_ENV === 'production') throw new Error('NEXTAUTH_SECRET must be set in production.');
  return 'oscillab-development-only-secret';
}
