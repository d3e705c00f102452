/**
 * Invitations: a new account gets a one-time link to set its password. Only the SHA-256 of the
 * token is stored; the link expires after INVITATION_DAYS and works once.
 */
import type { Transaction } from 'sequelize';
import type { User } from '@/models/user';
import { queueEmail } from '@/lib/mail/outbox';
import { renderEmail } from '@/lib/templates';
import { audit } from '@/lib/audit';
import { appOrigin, issueLink, linkState, setPasswordWithLink, type LinkState } from '@/lib/auth/one-time-link';

export const INVITATION_DAYS = 7;

const ROLE_WORDS: Record<string, string> = {
  student: 'a student',
  ta: 'a teaching assistant',
  instructor: 'an instructor',
  lead: 'course lead',
};

/** Create a token and queue the invitation e-mail, in the caller's transaction. Returns the token (for tests). */
export async function inviteUser(
  user: Pick<User, 'id' | 'email' | 'name'>,
  context: { courseTitle: string; role: string },
  transaction?: Transaction,
  now = new Date(),
): Promise<string> {
  const expiresAt = new Date(now.getTime() + INVITATION_DAYS * 86_400_000);
  const { token, id } = await issueLink(user.id, 'invitation', expiresAt, transaction);
  const { subject, text } = renderEmail('invitation', {
    name: user.name,
    course: context.courseTitle,
    role: ROLE_WORDS[context.role] ?? context.role,
    link: `${appOrigin()}/welcome/${token}`,
    email: user.email,
    expires: expiresAt.toUTCString(),
  });
  await queueEmail({ dedupeKey: `invitation:${user.id}:${id}`, to: user.email, subject, text }, transaction);
  return token;
}

const MESSAGES = {
  used: 'This link has already been used. Sign in with your password, or ask your instructor for a new invitation.',
  expired: 'This link has expired. Ask your instructor for a new invitation.',
  unknown: 'This link is not valid. Check that you copied the whole link from the e-mail.',
};

export type TokenState = LinkState;

/** What the welcome page shows for a token, without using it. */
export const invitationState = (token: string, now = new Date()) => linkState(token, 'invitation', MESSAGES, now);

/** Use the token once: set the password. A second use, an expired or unknown token is refused with 400/410. */
export function acceptInvitation(token: string, password: string, now = new Date()): Promise<{ email: string }> {
  return setPasswordWithLink(
    token,
    'invitation',
    password,
    MESSAGES,
    async (user, transaction) => {
      await audit({ actorId: user.id, action: 'invitation.accept', entityType: 'user', entityId: user.id }, transaction);
    },
    now,
  );
}
