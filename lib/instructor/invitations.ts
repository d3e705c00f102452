/**
 * Invitations: a new account gets a one-time link to set its password. Only the SHA-256 of the
 * token is stored; the link expires after INVITATION_DAYS and works once.
 */
import { createHash, randomBytes } from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { models } from '@/models';
import type { User } from '@/models/user';
import { queueEmail } from '@/lib/mail/outbox';
import { renderEmail } from '@/lib/templates';
import { sequelize } from '@/lib/db';
import { hashPassword, passwordSchema } from '@/lib/auth/password';
import { HttpError } from '@/lib/http-error';
import { validate } from '@/lib/http';
import { audit } from '@/lib/audit';

export const INVITATION_DAYS = 7;

export const hashToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');

export function appOrigin(): string {
  return (process.env.APP_ORIGIN || process.env.NEXTAUTH_URL || 'http://localhost:3000').replace(/\/+$/, '');
}

const ROLE_WORDS: Record<string, string> = { student: 'a student', ta: 'a teaching assistant', instructor: 'an instructor', lead: 'course lead' };

/** Create a token and queue the invitation e-mail, in the caller's transaction. Returns the token (for tests). */
export async function inviteUser(
  user: Pick<User, 'id' | 'email' | 'name'>,
  context: { courseTitle: string; role: string },
  transaction?: Transaction,
  now = new Date(),
): Promise<string> {
  const { OneTimeToken } = models();
  const token = randomBytes(32).toString('base64url');
  const expiresAt = new Date(now.getTime() + INVITATION_DAYS * 86_400_000);
  const row = await OneTimeToken.create({ userId: user.id, purpose: 'invitation', tokenHash: hashToken(token), expiresAt, usedAt: null }, { transaction });
  const { subject, text } = renderEmail('invitation', {
    name: user.name,
    course: context.courseTitle,
    role: ROLE_WORDS[context.role] ?? context.role,
    link: `${appOrigin()}/welcome/${token}`,
    email: user.email,
    expires: expiresAt.toUTCString(),
  });
  await queueEmail({ dedupeKey: `invitation:${user.id}:${row.id}`, to: user.email, subject, text }, transaction);
  return token;
}

export type TokenState = { ok: true; email: string; name: string } | { ok: false; message: string };

async function findToken(token: string, transaction?: Transaction) {
  if (typeof token !== 'string' || token.length < 20 || token.length > 200) return null;
  return models().OneTimeToken.findOne({ where: { tokenHash: hashToken(token), purpose: 'invitation' }, transaction });
}

const USED = 'This link has already been used. Sign in with your password, or ask your instructor for a new invitation.';
const EXPIRED = 'This link has expired. Ask your instructor for a new invitation.';
const UNKNOWN = 'This link is not valid. Check that you copied the whole link from the e-mail.';

/** What the welcome page shows for a token, without using it. */
export async function invitationState(token: string, now = new Date()): Promise<TokenState> {
  const row = await findToken(token);
  if (!row) return { ok: false, message: UNKNOWN };
  if (row.usedAt) return { ok: false, message: USED };
  if (row.expiresAt.getTime() <= now.getTime()) return { ok: false, message: EXPIRED };
  const user = await models().User.findByPk(row.userId);
  if (!user) return { ok: false, message: UNKNOWN };
  return { ok: true, email: user.email, name: user.name };
}

/** Use the token once: set the password. A second use, an expired or unknown token is refused with 400/410. */
export async function acceptInvitation(token: string, password: string, now = new Date()): Promise<{ email: string }> {
  validate(passwordSchema, password);
  const hash = await hashPassword(password);
  return sequelize().transaction(async (transaction) => {
    const { OneTimeToken, User } = models();
    const row = await findToken(token, transaction);
    if (!row) throw new HttpError(400, UNKNOWN);
    if (row.usedAt) throw new HttpError(410, USED);
    if (row.expiresAt.getTime() <= now.getTime()) throw new HttpError(410, EXPIRED);
    // Claim the token with a conditional update, so two requests racing cannot both use it.
    const [claimed] = await OneTimeToken.update({ usedAt: now }, { where: { id: row.id, usedAt: { [Op.is]: null } }, transaction });
    if (claimed !== 1) throw new HttpError(410, USED);
    const user = await User.findByPk(row.userId, { transaction });
    if (!user) throw new HttpError(400, UNKNOWN);
    await user.update({ passwordHash: hash }, { transaction });
    await audit({ actorId: user.id, action: 'invitation.accept', entityType: 'user', entityId: user.id }, transaction);
    return { email: user.email };
  });
}
