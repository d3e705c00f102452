import { beforeAll, describe, expect, it } from 'vitest';
import { authOptions } from '@/lib/auth/options';
import { buildWorld, TEST_PASSWORD, type World } from '../helpers/world';
import { models } from '@/models';

let world: World;
beforeAll(async () => {
  world = await buildWorld();
});

type Authorize = (credentials: Record<string, string>, req: { headers: Record<string, string> }) => Promise<{ id: string } | null>;
const authorizeCredentials = (authOptions.providers[0] as unknown as { options: { authorize: Authorize } }).options.authorize;
const from = (address: string) => ({ headers: { 'x-forwarded-for': address } });

describe('sign-in with e-mail and password', () => {
  it('accepts the right password and refuses a wrong one the same way as an unknown account', async () => {
    const { student } = world.people;
    expect(await authorizeCredentials({ email: student.email, password: TEST_PASSWORD }, from('10.0.0.1'))).toMatchObject({
      id: String(student.id),
    });
    expect(await authorizeCredentials({ email: student.email, password: 'wrong-password' }, from('10.0.0.1'))).toBeNull();
    expect(await authorizeCredentials({ email: 'nobody-here@test.example', password: 'wrong-password' }, from('10.0.0.1'))).toBeNull();
  });

  it('blocks an address that keeps failing for one account, also for a right password; the owner elsewhere gets in', async () => {
    const { ta } = world.people;
    for (let i = 0; i < 6; i++) await authorizeCredentials({ email: ta.email, password: `guess-${i}` }, from('10.1.0.1')).catch(() => null);
    await expect(authorizeCredentials({ email: ta.email, password: TEST_PASSWORD }, from('10.1.0.1'))).rejects.toThrow('throttled');
    const row = await models().SignInFailure.findOne({ where: { subject: `pair:${ta.email}|10.1.0.1` } });
    expect(row!.blockedUntil!.getTime()).toBeGreaterThan(Date.now());
    expect(await authorizeCredentials({ email: ta.email, password: TEST_PASSWORD }, from('10.1.1.1'))).toMatchObject({ id: String(ta.id) });
  });

  it('blocks one address failing across many accounts', async () => {
    const { instructor } = world.people;
    for (let i = 0; i < 31; i++)
      await authorizeCredentials({ email: `someone-${i}@test.example`, password: 'x' }, from('10.2.0.9')).catch(() => null);
    await expect(authorizeCredentials({ email: instructor.email, password: TEST_PASSWORD }, from('10.2.0.9'))).rejects.toThrow('throttled');
    expect(await authorizeCredentials({ email: instructor.email, password: TEST_PASSWORD }, from('10.2.0.10'))).toMatchObject({
      id: String(instructor.id),
    });
  });
});
