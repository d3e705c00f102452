/**
 * One-time links (invitations and password resets): a random token goes into the e-mailed link,
 * only its SHA-256 is stored in one_time_tokens, and a link works once before it expires.
 * Both kinds are read and used through these functions; each kind brings its own wording.
 */
import { createHash, randomBytes } from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { models } from '@/models';
import type { User } from '@/models/user';
import { sequelize } from '@/lib/db';
import { hashPassword, passwordSchema } from '@/lib/auth/password';
import { HttpError } from '@/lib/http-error';
import { validate } from '@/lib/http';

export type LinkPurpose = 'invitation' | 'password-reset';
export type LinkMessages = { unknown: string; used: string; expired: string };
export type LinkState = { ok: true; email: string; name: string } | { ok: false; message: string };

export const hashToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');

/** Where links point: the public address of the app. */
export function appOrigin(): string {
  return (process.env.APP_ORIGIN || process.env.NEXTAUTH_URL || 'http://localhost:3000').replace(/\/+$/, '');
}

/** Store a new link for the user (in the caller's transaction) and return its token. */
export async function issueLink(
  userId: number,
  purpose: LinkPurpose,
  expiresAt: Date,
  transaction?: Transaction,
): Promise<{ token: string; id: number }> {
  const token = randomBytes(32).toString('base64url');
  const row = await models().OneTimeToken.create(
    { userId, purpose, tokenHash: hashToken(token), expiresAt, usedAt: null },
    { transaction },
  );
  return { token, id: row.id };
}

export async function findLink(token: string, purpose: LinkPurpose, transaction?: Transaction) {
  if (typeof token !== 'string' || token.length < 20 || token.length > 200) return null;
  return models().OneTimeToken.findOne({ where: { tokenHash: hashToken(token), purpose }, transaction });
}

/** What a set-password page shows for a token, without using it. */
export async function linkState(token: string, purpose: LinkPurpose, messages: LinkMessages, now = new Date()): Promise<LinkState> {
  const row = await findLink(token, purpose);
  if (!row) return { ok: false, message: messages.unknown };
  if (row.usedAt) return { ok: false, message: messages.used };
  if (row.expiresAt.getTime() <= now.getTime()) return { ok: false, message: messages.expired };
  const user = await models().User.findByPk(row.userId);
  if (!user) return { ok: false, message: messages.unknown };
  return { ok: true, email: user.email, name: user.name };
}

/**
 * Use a link once to set a password: 400 for an unknown token, 410 for a used or expired one.
 * `afterSet` runs in the same transaction (audit, voiding other links …).
 */
export async function setPasswordWithLink(
  token: string,
  purpose: LinkPurpose,
  password: string,
  messages: LinkMessages,
  afterSet: (user: User, transaction: Transaction) => Promise<void>,
  now = new Date(),
): Promise<{ email: string }> {
  validate(passwordSchema, password);
  const hash = await hashPassword(password);
  return sequelize().transaction(async (transaction) => {
    const { OneTimeToken, User } = models();
    const row = await findLink(token, purpose, transaction);
    if (!row) throw new HttpError(400, messages.unknown);
    if (row.usedAt) throw new HttpError(410, messages.used);
    if (row.expiresAt.getTime() <= now.getTime()) throw new HttpError(410, messages.expired);
    // Claim the token with a conditional update, so two requests racing cannot both use it.
    const [claimed] = await OneTimeToken.update({ usedAt: now }, { where: { id: row.id, usedAt: { [Op.is]: null } }, transaction });
    if (claimed !== 1) throw new HttpError(410, messages.used);
    const user = await User.findByPk(row.userId, { transaction });
    if (!user) throw new HttpError(400, messages.unknown);
    // A new password ends every session signed in with the old one (lib/auth/session.ts).
    await user.update({ passwordHash: hash, sessionVersion: user.sessionVersion + 1 }, { transaction });
    await afterSet(user, transaction);
    return { email: user.email };
  });
}
