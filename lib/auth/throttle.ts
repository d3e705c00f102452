import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';
import { models } from '@/models';

/**
 * Slows down password guessing without letting a stranger lock anyone out. Failures are counted in
 * the database (so several app instances share the count), each with one atomic statement, per:
 *
 * - (account, address) pair: after PAIR_FREE failures within WINDOW_MS that address is blocked for
 *   that account, for a delay that doubles with each further failure up to MAX_BLOCK_MS;
 * - address: the same after ADDRESS_FREE failures across all accounts (one client trying many);
 * - account: never a block, since anyone could trigger it; past ACCOUNT_SOFT failures from all
 *   addresses together, each further failed attempt is answered after a delay (soft limit).
 *
 * So the owner, signing in from an address with no failures, gets in with the right password however
 * often others have guessed at the account. The address is the connection's own unless trusted
 * proxies are configured (lib/client-address.ts).
 */
const WINDOW_MS = 15 * 60_000;
export const PAIR_FREE = 5;
export const ADDRESS_FREE = 30;
export const ACCOUNT_SOFT = 10;
const FIRST_BLOCK_MS = 30_000;
const MAX_BLOCK_MS = 15 * 60_000;

/** Longest delay of the soft per-account limit (SIGNIN_MAX_DELAY_MS, default 3 s). */
export function maxSoftDelayMs(): number {
  const v = Number(process.env.SIGNIN_MAX_DELAY_MS);
  return Number.isFinite(v) && v >= 0 ? v : 3000;
}

export const accountSubject = (email: string) => `account:${email.trim().toLowerCase()}`;
export const addressSubject = (address: string) => `address:${address}`;
export const pairSubject = (email: string, address: string) => `pair:${email.trim().toLowerCase()}|${address}`;

export type SignInSubjects = { pair: string; address: string; account: string };

export function signInSubjects(email: string, address: string): SignInSubjects {
  return { pair: pairSubject(email, address), address: addressSubject(address), account: accountSubject(email) };
}

/** True while the pair or the address is blocked; the account alone never blocks. */
export async function isBlocked(subjects: SignInSubjects, now = new Date()): Promise<boolean> {
  const rows = await models().SignInFailure.findAll({ where: { subject: [subjects.pair, subjects.address] } });
  return rows.some((r) => r.blockedUntil && r.blockedUntil > now);
}

/**
 * Counts one more within the window, in one statement (a window that has passed starts again at 1),
 * and returns the count. Parallel calls each add their own one: none is lost.
 */
export async function countOne(subject: string, now = new Date(), windowMs = WINDOW_MS): Promise<number> {
  const db = sequelize();
  const windowStart = new Date(now.getTime() - windowMs);
  return db.transaction(async (transaction) => {
    await db.query(
      `INSERT INTO "sign_in_failures" ("subject", "failures", "firstFailureAt", "blockedUntil", "createdAt", "updatedAt")
       VALUES (:subject, 1, :now, NULL, :now, :now)
       ON CONFLICT ("subject") DO UPDATE SET
         "failures" = CASE WHEN "sign_in_failures"."firstFailureAt" < :windowStart THEN 1 ELSE "sign_in_failures"."failures" + 1 END,
         "blockedUntil" = CASE WHEN "sign_in_failures"."firstFailureAt" < :windowStart THEN NULL ELSE "sign_in_failures"."blockedUntil" END,
         "firstFailureAt" = CASE WHEN "sign_in_failures"."firstFailureAt" < :windowStart THEN :now ELSE "sign_in_failures"."firstFailureAt" END,
         "updatedAt" = :now`,
      { replacements: { subject, now, windowStart }, transaction },
    );
    const [row] = await db.query<{ failures: number }>('SELECT "failures" FROM "sign_in_failures" WHERE "subject" = :subject', {
      replacements: { subject },
      type: QueryTypes.SELECT,
      transaction,
    });
    return Number(row?.failures ?? 1);
  });
}

/** Blocks a subject until `until`, never shortening a block already longer. */
async function blockUntil(subject: string, until: Date): Promise<void> {
  await sequelize().query(
    'UPDATE "sign_in_failures" SET "blockedUntil" = :until WHERE "subject" = :subject AND ("blockedUntil" IS NULL OR "blockedUntil" < :until)',
    { replacements: { subject, until } },
  );
}

const blockFor = (failures: number, free: number) =>
  failures < free ? 0 : Math.min(MAX_BLOCK_MS, FIRST_BLOCK_MS * 2 ** (failures - free));

/** Records a failed sign-in; returns the soft delay (ms) to wait before answering it. */
export async function recordFailure(subjects: SignInSubjects, now = new Date()): Promise<number> {
  const [pair, address, account] = await Promise.all([
    countOne(subjects.pair, now),
    countOne(subjects.address, now),
    countOne(subjects.account, now),
  ]);
  const pairBlock = blockFor(pair, PAIR_FREE);
  const addressBlock = blockFor(address, ADDRESS_FREE);
  if (pairBlock) await blockUntil(subjects.pair, new Date(now.getTime() + pairBlock));
  if (addressBlock) await blockUntil(subjects.address, new Date(now.getTime() + addressBlock));
  return softDelayMs(account);
}

/** 250 ms for the first failure past ACCOUNT_SOFT, doubling, up to maxSoftDelayMs(). */
export function softDelayMs(accountFailures: number): number {
  if (accountFailures <= ACCOUNT_SOFT) return 0;
  return Math.min(maxSoftDelayMs(), 250 * 2 ** Math.min(20, accountFailures - ACCOUNT_SOFT - 1));
}

/** A right password from this address clears the pair's failures (not the address's, nor the account's). */
export async function clearFailures(subject: string): Promise<void> {
  await models().SignInFailure.destroy({ where: { subject } });
}
