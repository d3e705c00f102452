/**
 * Password reset: "forgot your password?" e-mails a one-time link. As with invitations, only the
 * SHA-256 of the token is stored (one_time_tokens, purpose 'password-reset'); a link expires after
 * RESET_MINUTES, works once, and is void as soon as a newer link is issued or the password changes.
 *
 * The request answers the same words, status and (as far as reasonable) time whether or not the
 * address has an account, so the form cannot be used to find out who has one. Requests are
 * counted per address and per client in sign_in_failures (subjects "reset:<email>" and
 * "reset-from:<client>") and refused with 429 beyond a small allowance, for known and unknown
 * addresses alike.
 */
import { Op, type Transaction } from 'sequelize';
import { models } from '@/models';
import { sequelize } from '@/lib/db';
import { queueEmail } from '@/lib/mail/outbox';
import { renderEmail } from '@/lib/templates';
import { HttpError } from '@/lib/http-error';
import { audit } from '@/lib/audit';
import { accountSubject, countOne } from '@/lib/auth/throttle';
import { clientAddress } from '@/lib/client-address';
import { appOrigin, findLink, issueLink, linkState, setPasswordWithLink, type LinkState } from '@/lib/auth/one-time-link';

export const RESET_MINUTES = 60;
export const RESET_PURPOSE = 'password-reset' as const;

/** The one answer to every accepted request, known address or not. */
export const RESET_REQUESTED_MESSAGE =
  'If that address belongs to an Oscillab account, a link to choose a new password is on its way. It works once, for one hour. Check your spam folder if nothing arrives within a few minutes.';
export const RESET_THROTTLED_MESSAGE = 'Too many reset requests. Wait a quarter of an hour before asking again.';

/** Requests allowed per window: a few per address (a person retrying), more per client (a shared campus network). */
const WINDOW_MS = 15 * 60_000;
const PER_ACCOUNT = 3;
const PER_CLIENT = 20;

/** Every answer takes at least this long, so a known address (token + queued mail) is not told apart by timing. */
export function minimumAnswerMs(): number {
  const configured = Number(process.env.RESET_MIN_ANSWER_MS);
  return Number.isFinite(configured) && configured >= 0 ? configured : 400;
}

export const resetAccountSubject = (email: string) => `reset:${email.trim().toLowerCase()}`;
export const resetClientSubject = (client: string) => `reset-from:${client}`;

/** The client address as the sign-in throttle sees it (lib/client-address.ts: the connection, or what a trusted proxy says). */
export function clientOf(request: Request): string {
  return clientAddress(request.headers);
}

type Limit = { subject: string; allowed: number };

/** Count one request against each limit; false (and nothing counted) when any limit is already used up. */
async function takeAllowance(limits: Limit[], now: Date): Promise<boolean> {
  const { SignInFailure } = models();
  const rows = await SignInFailure.findAll({ where: { subject: limits.map((l) => l.subject) } });
  const fresh = (row: (typeof rows)[number]) => now.getTime() - row.firstFailureAt.getTime() <= WINDOW_MS;
  for (const limit of limits) {
    const row = rows.find((r) => r.subject === limit.subject);
    if (row && fresh(row) && row.failures >= limit.allowed) {
      if (!row.blockedUntil) await row.update({ blockedUntil: new Date(row.firstFailureAt.getTime() + WINDOW_MS) });
      return false;
    }
  }
  // One atomic statement per counter, so parallel requests never lose a count.
  for (const limit of limits) await countOne(limit.subject, now, WINDOW_MS);
  return true;
}

/** Void every unused reset link of a user (a newer link was issued, or the password changed). */
export async function invalidateResetTokens(userId: number, transaction?: Transaction, now = new Date()): Promise<number> {
  const [count] = await models().OneTimeToken.update(
    { usedAt: now },
    { where: { userId, purpose: RESET_PURPOSE, usedAt: { [Op.is]: null } }, transaction },
  );
  return count;
}

/** Create a reset link for a known user and queue its e-mail, voiding older links. Returns the token (for tests). */
export async function issueResetToken(userId: number, now = new Date()): Promise<string> {
  const { User } = models();
  const expiresAt = new Date(now.getTime() + RESET_MINUTES * 60_000);
  return sequelize().transaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction });
    if (!user) throw new Error(`issueResetToken: no user ${userId}`);
    await invalidateResetTokens(user.id, transaction, now);
    const { token, id } = await issueLink(user.id, RESET_PURPOSE, expiresAt, transaction);
    const { subject, text } = renderEmail('password-reset', {
      name: user.name,
      email: user.email,
      link: `${appOrigin()}/reset/${token}`,
      minutes: RESET_MINUTES,
      expires: expiresAt.toUTCString(),
    });
    await queueEmail({ dedupeKey: `password-reset:${user.id}:${id}`, to: user.email, subject, text }, transaction);
    return token;
  });
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/**
 * Handle "forgot your password?" for an (already validated, lower-cased) address. Resolves with the
 * same message for every address; throws 429 when the address or the client has asked too often.
 */
/** POST /api/password-reset's answer: the same sentence for every address. */
export type PasswordResetAnswer = { message: string };

export async function requestPasswordReset(email: string, client: string, now = new Date()): Promise<PasswordResetAnswer> {
  const started = Date.now();
  try {
    const allowed = await takeAllowance(
      [
        { subject: resetAccountSubject(email), allowed: PER_ACCOUNT },
        { subject: resetClientSubject(client), allowed: PER_CLIENT },
      ],
      now,
    );
    if (!allowed) throw new HttpError(429, RESET_THROTTLED_MESSAGE);
    const user = await models().User.findOne({ where: { email: email.trim().toLowerCase() } });
    if (user) {
      await issueResetToken(user.id, now);
      await audit({ actorId: null, action: 'password-reset.request', entityType: 'user', entityId: user.id });
    }
    return { message: RESET_REQUESTED_MESSAGE };
  } finally {
    const left = minimumAnswerMs() - (Date.now() - started);
    if (left > 0) await sleep(left);
  }
}

export type ResetTokenState = LinkState;

const MESSAGES = {
  unknown: 'This link is not valid. Check that you copied the whole link from the e-mail, or ask for a new one.',
  used: 'This link has already been used or replaced by a newer one. Ask for a new link if you still need one.',
  expired: `This link has expired (links work for ${RESET_MINUTES} minutes). Ask for a new one.`,
};

/** Whether a token is a password-reset token at all (used or not), so the set-password route can tell it from an invitation. */
export async function isResetToken(token: string): Promise<boolean> {
  return (await findLink(token, RESET_PURPOSE)) !== null;
}

/** What the reset page shows for a token, without using it. */
export const resetTokenState = (token: string, now = new Date()): Promise<ResetTokenState> =>
  linkState(token, RESET_PURPOSE, MESSAGES, now);

/** Use a reset token once: set the new password and void every other reset link of the account. */
export function resetPassword(token: string, password: string, now = new Date()): Promise<{ email: string }> {
  return setPasswordWithLink(
    token,
    RESET_PURPOSE,
    password,
    MESSAGES,
    async (user, transaction) => {
      await invalidateResetTokens(user.id, transaction, now);
      // A forgotten password also ends any sign-in slow-down on the account.
      await models().SignInFailure.destroy({ where: { subject: accountSubject(user.email) }, transaction });
      await audit({ actorId: user.id, action: 'password-reset.complete', entityType: 'user', entityId: user.id }, transaction);
    },
    now,
  );
}
