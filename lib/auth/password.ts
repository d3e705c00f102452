import bcrypt from 'bcryptjs';
import { z } from 'zod';

/** Password rules: long enough to resist guessing, short enough for bcrypt (72 bytes), not all one character. */
export const passwordSchema = z
  .string()
  .min(10, 'Use at least 10 characters.')
  .max(72, 'Use at most 72 characters.')
  .refine((p) => new Set(p).size >= 4, 'Use a mix of at least 4 different characters.')
  .refine((p) => Buffer.byteLength(p, 'utf8') <= 72, 'Use at most 72 bytes (fewer accented or special characters).');

const ROUNDS = process.env.NODE_ENV === 'test' ? 4 : 10;

export const hashPassword = (plain: string) => bcrypt.hash(plain, ROUNDS);
export const verifyPassword = (plain: string, hash: string) => bcrypt.compare(plain, hash);

/** A hash to compare against when the account does not exist, so both paths take the same time. */
export const DUMMY_HASH = bcrypt.hashSync('not-a-real-password-0', ROUNDS);
