/**
 * Security and robustness, round two (issue 14), item 4: signing out ends the session on the
 * server, so a copy of the cookie taken before sign-out stops working; "sign out everywhere" ends
 * every session of the account.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { decode, encode } from 'next-auth/jwt';
import { authOptions } from '@/lib/auth/options';
import { GET as me } from '@/app/api/me/route';
import { POST as signOutEverywhere } from '@/app/api/me/sign-out-everywhere/route';
import { POST as signOutHere } from '@/app/api/me/sign-out/route';
import { apiRequest } from '../helpers/session';
import { buildWorld, TEST_PASSWORD, type World } from '../helpers/world';
import { models } from '@/models';

type Authorize = (credentials: Record<string, string>, req: { headers: Record<string, string> }) => Promise<{ id: string } | null>;
const authorizeCredentials = (authOptions.providers[0] as unknown as { options: { authorize: Authorize } }).options.authorize;

let world: World;
let n = 0;
beforeAll(async () => {
  world = await buildWorld();
});

/** A cookie made as next-auth makes one at sign-in: the credentials check, then the jwt callback. */
async function signedInCookie(email: string): Promise<string> {
  const user = await authorizeCredentials({ email, password: TEST_PASSWORD }, { headers: { 'x-forwarded-for': `10.7.0.${++n}` } });
  expect(user).not.toBeNull();
  const token = await authOptions.callbacks!.jwt!({ token: {}, user: user as never, account: null } as never);
  return `next-auth.session-token=${await encode({ token, secret: process.env.NEXTAUTH_SECRET! })}`;
}
/** What next-auth's sign-out does with the cookie's token before clearing the cookie: the signOut event. */
async function signOut(cookie: string) {
  const token = await decode({ token: cookie.split('=')[1], secret: process.env.NEXTAUTH_SECRET! });
  await (authOptions.events!.signOut as (m: { token: unknown }) => Promise<void>)({ token });
}
const whoAmI = async (cookie: string) => (await me(await apiRequest('/api/me', { headers: { cookie } }), {})).status;

describe('signing out ends the session (item 4)', () => {
  it('a cookie copied before sign-out no longer works; the same account on another device stays signed in', async () => {
    const { student } = world.people;
    const laptop = await signedInCookie(student.email);
    const copied = laptop;
    const phone = await signedInCookie(student.email);
    expect(await whoAmI(copied)).toBe(200);
    await signOut(laptop);
    expect(await whoAmI(copied)).toBe(401);
    expect(await whoAmI(phone)).toBe(200);
    expect(await models().EndedSession.count({ where: { userId: student.id } })).toBe(1);
  });

  it('every session token carries its own id; a token without one is not a session', async () => {
    const a = await decode({ token: (await signedInCookie(world.people.ta.email)).split('=')[1], secret: process.env.NEXTAUTH_SECRET! });
    const b = await decode({ token: (await signedInCookie(world.people.ta.email)).split('=')[1], secret: process.env.NEXTAUTH_SECRET! });
    expect(a!.sid).toMatch(/^[a-f0-9]{32}$/);
    expect(a!.sid).not.toBe(b!.sid);
    const noSid = `next-auth.session-token=${await encode({ token: { sub: String(world.people.ta.id), sv: 0 }, secret: process.env.NEXTAUTH_SECRET! })}`;
    expect(await whoAmI(noSid)).toBe(401);
  });

  it('"sign out everywhere" ends every session of the account, on every device, and only of that account', async () => {
    const { instructor, lead } = world.people;
    const laptop = await signedInCookie(instructor.email);
    const phone = await signedInCookie(instructor.email);
    const someoneElse = await signedInCookie(lead.email);
    const res = await signOutEverywhere(
      await apiRequest('/api/me/sign-out-everywhere', { method: 'POST', headers: { cookie: laptop } }),
      {},
    );
    expect(res.status).toBe(200);
    expect(await whoAmI(laptop)).toBe(401);
    expect(await whoAmI(phone)).toBe(401);
    expect(await whoAmI(someoneElse)).toBe(200);
    expect(await whoAmI(await signedInCookie(instructor.email))).toBe(200);
    expect(await models().AuditEntry.count({ where: { action: 'session.end-all', actorId: instructor.id } })).toBe(1);
    const anonymous = await signOutEverywhere(await apiRequest('/api/me/sign-out-everywhere', { method: 'POST' }), {});
    expect(anonymous.status).toBe(401);
  });
});

/** The header's buttons are plain form posts (no next-auth client script on every page). */
describe('signing out with a plain form post', () => {
  const FORM = { 'content-type': 'application/x-www-form-urlencoded' };
  const removed = (res: Response) =>
    res.headers.getSetCookie().filter((c) => /^(__Secure-)?next-auth\.session-token=;/.test(c) && /Max-Age=0/.test(c));

  it('"Sign out" ends this session only, removes the cookie and sends the browser to sign-in with a 303', async () => {
    const { ta } = world.people;
    const laptop = await signedInCookie(ta.email);
    const phone = await signedInCookie(ta.email);
    const res = await signOutHere(
      await apiRequest('/api/me/sign-out', { method: 'POST', headers: { cookie: laptop, ...FORM }, rawBody: '' }),
      {},
    );
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe('/signin');
    expect(removed(res)).toHaveLength(2);
    expect(await whoAmI(laptop)).toBe(401);
    expect(await whoAmI(phone)).toBe(200);
  });

  it('signed out already, or with a forged cookie, it changes nothing and still goes to sign-in', async () => {
    const before = await models().EndedSession.count();
    for (const cookie of [undefined, 'next-auth.session-token=not-a-token']) {
      const res = await signOutHere(
        await apiRequest('/api/me/sign-out', { method: 'POST', headers: { ...(cookie ? { cookie } : {}), ...FORM }, rawBody: '' }),
        {},
      );
      expect(res.status).toBe(303);
      expect(removed(res)).toHaveLength(2);
    }
    expect(await models().EndedSession.count()).toBe(before);
  });

  it('a form posted from another site is refused and the session stays', async () => {
    const cookie = await signedInCookie(world.people.ta.email);
    for (const handler of [signOutHere, signOutEverywhere]) {
      const res = await handler(
        await apiRequest('/api/me/sign-out', {
          method: 'POST',
          headers: { cookie, ...FORM, origin: 'https://elsewhere.example' },
          rawBody: '',
        }),
        {},
      );
      expect(res.status).toBe(403);
    }
    expect(await whoAmI(cookie)).toBe(200);
  });

  it('"Sign out everywhere" as a form: every session ends, the cookie is removed, 303 to sign-in; an ended session gets the same', async () => {
    const { lead } = world.people;
    const laptop = await signedInCookie(lead.email);
    const phone = await signedInCookie(lead.email);
    const res = await signOutEverywhere(
      await apiRequest('/api/me/sign-out-everywhere', { method: 'POST', headers: { cookie: laptop, ...FORM }, rawBody: '' }),
      {},
    );
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe('/signin');
    expect(removed(res)).toHaveLength(2);
    expect(await whoAmI(phone)).toBe(401);
    const again = await signOutEverywhere(
      await apiRequest('/api/me/sign-out-everywhere', { method: 'POST', headers: { cookie: phone, ...FORM }, rawBody: '' }),
      {},
    );
    expect(again.status).toBe(303);
    expect(await models().AuditEntry.count({ where: { action: 'session.end-all', actorId: lead.id } })).toBe(1);
  });
});
