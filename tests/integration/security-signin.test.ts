/**
 * Security and robustness, round two (issue 14), sign-in: the per-address limit must not trust a
 * client's own X-Forwarded-For (item 2), a stranger must not be able to lock an account's owner
 * out (item 3), and parallel failures must each be counted.
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { authOptions } from '@/lib/auth/options';
import { clientAddress, guardForwardedHeaders } from '@/lib/client-address';
import { ACCOUNT_SOFT, ADDRESS_FREE, countOne, recordFailure, signInSubjects, softDelayMs } from '@/lib/auth/throttle';
import { assertSameOrigin } from '@/lib/http';
import { buildWorld, TEST_PASSWORD, type World } from '../helpers/world';
import { models } from '@/models';

type Authorize = (
  credentials: Record<string, string>,
  req: { headers: Record<string, string | string[] | undefined> },
) => Promise<{ id: string } | null>;
const authorizeCredentials = (authOptions.providers[0] as unknown as { options: { authorize: Authorize } }).options.authorize;
const from = (address: string) => ({ headers: { 'x-forwarded-for': address } });

let world: World;
let server: http.Server;
let base: string;

/**
 * A plain Node HTTP server, as `next start` runs one, with the edge guard of instrumentation.ts
 * installed: each request's headers (after the guard) go to the sign-in check, as next-auth passes them.
 */
beforeAll(async () => {
  world = await buildWorld();
  process.env.SIGNIN_MAX_DELAY_MS = '20'; // the soft delay is measured by softDelayMs below, not waited for here
  await guardForwardedHeaders();
  server = http.createServer(async (req, res) => {
    const body = JSON.parse(
      await new Promise<string>((resolve) => {
        let s = '';
        req.on('data', (c) => (s += c)).on('end', () => resolve(s));
      }),
    );
    let outcome: string;
    try {
      outcome = (await authorizeCredentials(body, { headers: req.headers })) ? 'signed-in' : 'refused';
    } catch (e) {
      outcome = (e as Error).message;
    }
    res.end(JSON.stringify({ outcome, client: clientAddress(req.headers as never) }));
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});
afterAll(async () => {
  delete process.env.SIGNIN_MAX_DELAY_MS;
  delete process.env.TRUSTED_PROXIES;
  await new Promise((resolve) => server.close(resolve));
});

async function signIn(email: string, password: string, headers: Record<string, string> = {}) {
  const res = await fetch(base, {
    method: 'POST',
    headers: { 'content-type': 'application/json', ...headers },
    body: JSON.stringify({ email, password }),
  });
  return (await res.json()) as { outcome: string; client: string };
}

describe('the per-address limit uses the connection, not a header the client writes (item 2)', () => {
  it('30 guesses over 20 accounts, each with a new X-Forwarded-For, are still counted against one address and slowed', async () => {
    const outcomes: string[] = [];
    for (let i = 0; i < ADDRESS_FREE + 5; i++) {
      const r = await signIn(`guess-target-${i % 20}@test.example`, `wrong-${i}`, { 'x-forwarded-for': `198.51.100.${i}` });
      expect(r.client).toBe('127.0.0.1');
      outcomes.push(r.outcome);
    }
    expect(outcomes.slice(0, ADDRESS_FREE)).toEqual(Array(ADDRESS_FREE).fill('refused'));
    expect(outcomes.slice(ADDRESS_FREE + 1)).toEqual(Array(4).fill('throttled'));
    // A new header does not make a blocked address a new client.
    expect((await signIn(world.people.ta.email, TEST_PASSWORD, { 'x-forwarded-for': '203.0.113.77' })).outcome).toBe('throttled');
    await models().SignInFailure.destroy({ where: {} });
  });

  it('with TRUSTED_PROXIES=1 the address the proxy appended counts, and what the client wrote before it does not', async () => {
    process.env.TRUSTED_PROXIES = '1';
    try {
      // Client wrote "192.0.2.1"; the proxy (this connection) appended the client's real address.
      const r = await signIn(world.people.ta.email, 'wrong', { 'x-forwarded-for': '192.0.2.1, 203.0.113.9' });
      expect(r.client).toBe('203.0.113.9');
    } finally {
      delete process.env.TRUSTED_PROXIES;
      await models().SignInFailure.destroy({ where: {} });
    }
  });

  it('the same-origin check believes X-Forwarded-Host only from a trusted proxy', () => {
    const spoofed = () =>
      new Request('http://localhost:3000/api/courses', {
        method: 'POST',
        headers: { origin: 'http://evil.example', host: 'localhost:3000', 'x-forwarded-host': 'evil.example' },
      });
    expect(() => assertSameOrigin(spoofed())).toThrow('Cross-site request refused.');
    process.env.TRUSTED_PROXIES = '1';
    try {
      expect(() => assertSameOrigin(spoofed())).not.toThrow();
    } finally {
      delete process.env.TRUSTED_PROXIES;
    }
  });
});

describe('no one can lock an account out (item 3)', () => {
  it('after 30 failures from 30 addresses, the owner signs in with the right password from an address with no failures', async () => {
    const { student } = world.people;
    for (let i = 0; i < 30; i++)
      expect(await authorizeCredentials({ email: student.email, password: `guess-${i}` }, from(`10.9.0.${i}`))).toBeNull();
    expect(await authorizeCredentials({ email: student.email, password: TEST_PASSWORD }, from('10.9.1.1'))).toMatchObject({
      id: String(student.id),
    });
    // The account's own count is a soft limit: it delays answers, it never blocks.
    const account = await models().SignInFailure.findOne({ where: { subject: `account:${student.email}` } });
    expect(account!.failures).toBe(30);
    expect(account!.blockedUntil).toBeNull();
  });

  it('the address that guessed is blocked for that account; a few requests per quarter hour cannot keep the owner out', async () => {
    const { lead } = world.people;
    for (let i = 0; i < 6; i++)
      await authorizeCredentials({ email: lead.email, password: `guess-${i}` }, from('10.9.2.1')).catch(() => null);
    await expect(authorizeCredentials({ email: lead.email, password: TEST_PASSWORD }, from('10.9.2.1'))).rejects.toThrow('throttled');
    expect(await authorizeCredentials({ email: lead.email, password: TEST_PASSWORD }, from('10.9.2.2'))).toMatchObject({
      id: String(lead.id),
    });
  });

  it('past the soft limit failed attempts on the account are answered after a growing delay, capped', () => {
    delete process.env.SIGNIN_MAX_DELAY_MS;
    try {
      expect(softDelayMs(ACCOUNT_SOFT)).toBe(0);
      expect(softDelayMs(ACCOUNT_SOFT + 1)).toBe(250);
      expect(softDelayMs(ACCOUNT_SOFT + 2)).toBe(500);
      expect(softDelayMs(ACCOUNT_SOFT + 40)).toBe(3000);
    } finally {
      process.env.SIGNIN_MAX_DELAY_MS = '20';
    }
  });

  it('counts every one of 20 parallel failures (one atomic statement each)', async () => {
    const subjects = signInSubjects('parallel@test.example', '10.9.3.1');
    const delays = await Promise.all(Array.from({ length: 20 }, () => recordFailure(subjects)));
    expect(delays.filter((d) => d > 0).length).toBe(20 - ACCOUNT_SOFT);
    const rows = await models().SignInFailure.findAll({ where: { subject: [subjects.pair, subjects.address, subjects.account] } });
    expect(rows.map((r) => r.failures)).toEqual([20, 20, 20]);
    const counts = await Promise.all(Array.from({ length: 10 }, () => countOne('parallel-count')));
    expect(counts.sort((a, b) => a - b)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
  });
});
