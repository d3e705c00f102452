import { models } from '@/models';

/**
 * Slows down guessing: failures are counted per account and per client address in the database
 * (so several app instances share the count). After FREE_FAILURES within WINDOW_MS, the subject is
 * blocked for a delay that doubles with each further failure, up to MAX_BLOCK_MS.
 */
const WINDOW_MS = 15 * 60_000;
const FREE_FAILURES = 5;
const FIRST_BLOCK_MS = 30_000;
const MAX_BLOCK_MS = 15 * 60_000;

export const accountSubject = (email: string) => `account:${email.trim().toLowerCase()}`;
export const addressSubject = (address: string) => `address:${address}`;

export async function isBlocked(subjects: string[], now = new Date()): Promise<boolean> {
  const { SignInFailure } = models();
  const rows = await SignInFailure.findAll({ where: { subject: subjects } });
  return rows.some((r) => r.blockedUntil && r.blockedUntil > now);
}

export async function recordFailure(subjects: string[], now = new Date()): Promise<void> {
  const { SignInFailure } = models();
  for (const subject of subjects) {
    const row = await SignInFailure.findOne({ where: { subject } });
    if (!row || now.getTime() - row.firstFailureAt.getTime() > WINDOW_MS) {
      if (row) await row.update({ failures: 1, firstFailureAt: now, blockedUntil: null });
      else await SignInFailure.create({ subject, failures: 1, firstFailureAt: now, blockedUntil: null });
      continue;
    }
    const failures = row.failures + 1;
    const over = failures - FREE_FAILURES;
    const blockedUntil = over >= 0 ? new Date(now.getTime() + Math.min(MAX_BLOCK_MS, FIRST_BLOCK_MS * 2 ** over)) : null;
    await row.update({ failures, blockedUntil });
  }
}

export async function clearFailures(subject: string): Promise<void> {
  await models().SignInFailure.destroy({ where: { subject } });
}
