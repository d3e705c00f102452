import { beforeAll, describe, expect, it } from 'vitest';
import { apiRequest } from '../helpers/session';
import { buildWorld, type World } from '../helpers/world';
import { POST as grantRole } from '@/app/api/admin/memberships/route';
import { POST as authPost } from '@/app/api/auth/[...nextauth]/route';
import { models } from '@/models';

let world: World;
beforeAll(async () => {
  world = await buildWorld();
});

const counts = async () => {
  const { CourseMembership, SignInFailure, AuditEntry, User } = models();
  return { m: await CourseMembership.count(), f: await SignInFailure.count(), a: await AuditEntry.count(), u: await User.count() };
};

const signInPost = (body: string, type = 'application/x-www-form-urlencoded') =>
  authPost(
    new Request('http://localhost:3000/api/auth/callback/credentials', {
      method: 'POST',
      headers: { 'content-type': type, origin: 'http://localhost:3000' },
      body,
    }),
    {
      params: Promise.resolve({ nextauth: ['callback', 'credentials'] }),
    },
  );

describe('bad input is refused with a clear 4xx and changes nothing', () => {
  it('malformed sign-in bodies', async () => {
    const before = await counts();
    const cases: [string, string | undefined, number][] = [
      ['email=not-an-address&password=x', undefined, 400],
      ['password=only', undefined, 400],
      [`email=${'a'.repeat(300)}@x.example&password=x`, undefined, 400],
      [`email=a@x.example&password=${'p'.repeat(500)}`, undefined, 400],
      ['{"email":"a@x.example","password":"x"}', 'application/json', 415],
      [`email=a@x.example&password=${'p'.repeat(20000)}`, undefined, 413],
    ];
    for (const [body, type, status] of cases) {
      const res = await signInPost(body, type);
      expect(res.status, body.slice(0, 40)).toBe(status);
      const json = await res.json();
      expect(typeof json.error).toBe('string');
      expect(json.error.length).toBeGreaterThan(5);
    }
    expect(await counts()).toEqual(before);
  });

  it('granting an unknown role, or to unknown people or courses', async () => {
    const { course, people } = world;
    const before = await counts();
    const send = async (body: unknown, as = people.admin.id) =>
      grantRole(await apiRequest('/api/admin/memberships', { as, body }), undefined);
    const cases: [unknown, number][] = [
      [{ email: people.nobody.email, courseId: course.id, role: 'superuser' }, 400],
      [{ email: people.nobody.email, courseId: course.id, role: 'TA' }, 400],
      [{ email: people.nobody.email, courseId: 'one', role: 'ta' }, 400],
      [{ email: people.nobody.email, courseId: course.id }, 400],
      [{ email: 'nobody-at-all@test.example', courseId: course.id, role: 'ta' }, 404],
      [{ email: people.nobody.email, courseId: 987654, role: 'ta' }, 404],
      [{ email: people.nobody.email, courseId: course.id, role: 'student' }, 400],
      [[1, 2, 3], 400],
      ['"just a string"', 400],
    ];
    for (const [body, status] of cases) {
      const res = await send(body);
      expect(res.status, JSON.stringify(body)).toBe(status);
      expect((await res.json()).error).toMatch(/\w{4,}/);
    }
    const notJson = await grantRole(
      await apiRequest('/api/admin/memberships', {
        as: people.admin.id,
        rawBody: '{oops',
        headers: { 'content-type': 'application/json' },
      }),
      undefined,
    );
    expect(notJson.status).toBe(400);
    const wrongType = await grantRole(
      await apiRequest('/api/admin/memberships', { as: people.admin.id, rawBody: 'a=b', headers: { 'content-type': 'text/plain' } }),
      undefined,
    );
    expect(wrongType.status).toBe(415);
    let deep: unknown = 1;
    for (let i = 0; i < 100; i++) deep = { deep };
    expect((await send(deep)).status).toBe(400);
    expect((await send({ email: people.nobody.email, courseId: course.id, role: 'ta' }, people.lead.id)).status).toBe(403);
    expect(await counts()).toEqual(before);
  });

  it('refuses a state-changing request from another site', async () => {
    const { course, people } = world;
    const req = await apiRequest('/api/admin/memberships', {
      as: people.admin.id,
      body: { email: people.nobody.email, courseId: course.id, role: 'ta' },
      headers: { origin: 'https://evil.example' },
    });
    expect((await grantRole(req, undefined)).status).toBe(403);
  });

  it('grants a known role once, audited', async () => {
    const { course, people } = world;
    const body = { email: people.nobody.email, courseId: course.id, role: 'ta' };
    const res = await grantRole(await apiRequest('/api/admin/memberships', { as: people.admin.id, body }), undefined);
    expect(res.status).toBe(201);
    await grantRole(await apiRequest('/api/admin/memberships', { as: people.admin.id, body }), undefined);
    const { CourseMembership, AuditEntry } = models();
    expect(await CourseMembership.count({ where: { userId: people.nobody.id, courseId: course.id, role: 'ta' } })).toBe(1);
    expect(await AuditEntry.count({ where: { action: 'membership.grant' } })).toBe(1);
  });
});
