import bcrypt from 'bcryptjs';
import { z } from 'zod';
import { dictionary } from '@zxcvbn-ts/language-common';

/**
 * Passwords people commonly choose, as leaked lists show them: the common-password dictionary
 * shipped in @zxcvbn-ts/language-common (about 49 000 entries, read from node_modules, nothing
 * fetched). Loaded on first use, lower case.
 */
let common: Set<string> | null = null;
function commonPasswords(): Set<string> {
  common ??= new Set((dictionary['passwords-common'] as string[]).map((p) => p.toLowerCase()));
  return common;
}

/** True for a common password, also with digits or symbols added before or after ("password123", "!!dragon"). */
export function isCommonPassword(password: string): boolean {
  const lower = password.toLowerCase();
  const list = commonPasswords();
  const candidates = [lower, lower.replace(/[\d\W_]+$/, ''), lower.replace(/^[\d\W_]+/, ''), lower.replace(/^[\d\W_]+|[\d\W_]+$/g, '')];
  return candidates.some((c) => c.length >= 4 && list.has(c));
}

/** Password rules: long enough to resist guessing, short enough for bcrypt (72 bytes), not all one character, not a common one. */
export const passwordSchema = z
  .string()
  .min(12, 'Use at least 12 characters.')
  .max(72, 'Use at most 72 characters.')
  .refine((p) => new Set(p).size >= 4, 'Use a mix of at least 4 different characters.')
  .refine((p) => Buffer.byteLength(p, 'utf8') <= 72, 'Use at most 72 bytes (fewer accented or special characters).')
  // eslint-disable-next-line no-control-regex -- refusing control characters is the point of this pattern
  .refine((p) => !/[\u0000-\u001f\u007f]/.test(p), 'Use letters, digits, spaces and punctuation only (no control characters).')
  .refine((p) => !isCommonPassword(p), 'That password is on the list of commonly used passwords, which are guessed first; choose another.');

const ROUNDS = process.env.NODE_ENV === 'test' ? 4 : 10;

export const hashPassword = (plain: string) => bcrypt.hash(plain, ROUNDS);
export const verifyPassword = (plain: string, hash: string) => bcrypt.compare(plain, hash);

/** A hash to compare against when the account does not exist, so both paths take the same time. */
export const DUMMY_HASH = bcrypt.hashSync('not-a-real-password-0', ROUNDS);
