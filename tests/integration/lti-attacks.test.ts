/**
 * Bad launches (issue 18): every kind of wrong or hostile id_token is refused with a clear page (a
 * 4xx, a sentence, a code) and writes nothing — every table compared before and after. The tokens
 * are signed by the local stand-in platform's own key (its test-only /control/sign) unless the
 * attack is about the signature itself; a correct token made the same way is accepted, so each
 * refusal is the check under test and not the harness.
 */
import crypto from 'node:crypto';
import { SignJWT, generateKeyPair, type JWTPayload } from 'jose';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildWorld, type World } from '@/tests/helpers/world';
import { sessionCookie } from '@/tests/helpers/session';
import { createFixturePractical } from '@/lib/marking/test-fixtures';
import { Browser, serveHandlers, startFakePlatform, testPorts, type FakePlatform } from '@/tests/helpers/fake-platform';
import { tableChecksums } from '@/tests/helpers/routes';
import { buildPractical } from '@/tests/fixtures/submissions/practical';
import { connectContext, createRegistration } from '@/lib/lti/admin';
import { forgetPlatformKeys } from '@/lib/lti/platform-keys';
import * as jwks from '@/app/api/lti/jwks/route';
import * as login from '@/app/api/lti/login/route';
import * as launch from '@/app/api/lti/launch/route';
import * as health from '@/app/api/health/route';
import * as me from '@/app/api/me/route';

const PORTS = testPorts(1);
process.env.NEXTAUTH_URL = `http://localhost:${PORTS.oscillab}`;
process.env.LTI_KEYSET_COOLDOWN_MS = '0';
const OSCILLAB = process.env.NEXTAUTH_URL;
const CLIENT_ID = 'oscillab-northmere';
const STUDENT = 'nmu-40d1b8';
const MENTOR = 'nmu-c3b6a0';

const C = {
  messageType: 'https://purl.imsglobal.org/spec/lti/claim/message_type',
  version: 'https://purl.imsglobal.org/spec/lti/claim/version',
  deploymentId: 'https://purl.imsglobal.org/spec/lti/claim/deployment_id',
  targetLinkUri: 'https://purl.imsglobal.org/spec/lti/claim/target_link_uri',
  resourceLink: 'https://purl.imsglobal.org/spec/lti/claim/resource_link',
  roles: 'https://purl.imsglobal.org/spec/lti/claim/roles',
  context: 'https://purl.imsglobal.org/spec/lti/claim/context',
  custom: 'https://purl.imsglobal.org/spec/lti/claim/custom',
};

let platform: FakePlatform;
let server: { url: string; close: () => Promise<void> };
let w: World;
let itemId: string;
let practicalId: number;
let foreignPracticalId: number;

beforeAll(async () => {
  server = await serveHandlers(PORTS.oscillab, [
    ['GET', /^\/api\/lti\/jwks$/, jwks.GET],
    ['GET', /^\/api\/lti\/login$/, login.GET],
    ['POST', /^\/api\/lti\/launch$/, launch.POST],
  ]);
  platform = await startFakePlatform(PORTS.platform, OSCILLAB);
  w = await buildWorld();
  practicalId = (await buildPractical(w)).practical.id;
  foreignPracticalId = (await createFixturePractical(w.otherCourse.id, [w.foreignCohort.id])).id;
  const reg = await createRegistration(
    {
      name: 'Stand-in',
      issuer: platform.url,
      clientId: CLIENT_ID,
      deploymentIds: ['northmere-main'],
      authLoginUrl: `${platform.url}/auth`,
      authTokenUrl: `${platform.url}/token`,
      keySetUrl: `${platform.url}/jwks`,
    },
    w.people.admin.id,
  );
  await connectContext(
    { registrationId: reg.id, contextId: 'nmu-chem2041-2026', courseId: w.course.id, defaultCohortId: w.cohort.id },
    w.people.admin.id,
  );
  itemId = (await platform.control<{ id: string }>('items', { title: 'HCl', custom: { oscillab_practical: String(practicalId) } })).id;
}, 60_000);

afterAll(async () => {
  await platform?.stop();
  await server?.close();
  forgetPlatformKeys();
});

type Started = { browser: Browser; state: string; nonce: string };

/** Login initiation from the platform, stopping where the platform would sign the token: the browser then holds the state cookie. */
async function begin(user = STUDENT, browser = new Browser()): Promise<Started> {
  const page = await browser.go(`${platform.url}/as`, {
    form: { user, item: itemId, mode: 'window' },
    initiator: `${platform.url}/`,
    follow: (url) => !url.startsWith(`${platform.url}/auth`),
  });
  const auth = new URL(page.url);
  expect(auth.pathname).toBe('/auth');
  return { browser, state: auth.searchParams.get('state')!, nonce: auth.searchParams.get('nonce')! };
}

function claims(s: Started, changes: Record<string, unknown> = {}, user = STUDENT): JWTPayload {
  const now = Math.floor(Date.now() / 1000);
  const base: Record<string, unknown> = {
    iss: platform.url,
    aud: CLIENT_ID,
    azp: CLIENT_ID,
    sub: user,
    iat: now,
    exp: now + 300,
    nonce: s.nonce,
    name: 'Amara Abernethy',
    email: 'student01@northmere.example',
    [C.messageType]: 'LtiResourceLinkRequest',
    [C.version]: '1.3.0',
    [C.deploymentId]: 'northmere-main',
    [C.targetLinkUri]: `${OSCILLAB}/api/lti/launch`,
    [C.resourceLink]: { id: itemId, title: 'HCl' },
    [C.roles]: ['http://purl.imsglobal.org/vocab/lis/v2/membership#Learner'],
    [C.context]: { id: 'nmu-chem2041-2026', title: 'CHEM2041' },
    [C.custom]: { oscillab_practical: String(practicalId) },
  };
  for (const [k, v] of Object.entries(changes)) {
    if (v === undefined) delete base[k];
    else base[k] = v;
  }
  return base as JWTPayload;
}

const signed = async (payload: JWTPayload, header: Record<string, unknown> = {}) =>
  (await platform.control<{ jwt: string }>('sign', { payload, header })).jwt;

/** Post the id_token to the launch URL from Oscillab's own page (so the state cookie goes with it). */
async function post(s: Started, idToken: string, state = s.state, extra: Record<string, string> = {}) {
  const page = await s.browser.go(`${OSCILLAB}/api/lti/launch`, {
    form: { id_token: idToken, state, oscillab_relay: '1', ...extra },
    initiator: `${OSCILLAB}/api/lti/launch`,
    follow: () => false,
  });
  return page;
}

async function expectRefused(run: () => Promise<{ status: number; html: string; headers: Headers }>, status: number, code: string) {
  const before = await tableChecksums();
  const res = await run();
  const after = await tableChecksums();
  expect({ status: res.status, code: res.headers.get('x-oscillab-refusal') }).toEqual({ status, code });
  expect(res.headers.get('content-type')).toContain('text/html');
  expect(res.html).toMatch(/<h1>[A-Z][^<]{10,}<\/h1><p>[A-Z][^<]{10,}<\/p>/);
  expect(res.headers.getSetCookie().some((c) => c.includes('session-token'))).toBe(false);
  expect(Object.keys(after).filter((t) => after[t] !== before[t])).toEqual([]);
  return res;
}

describe('a correct launch made the same way', () => {
  it('is accepted (so every refusal below is the check under test)', async () => {
    const s = await begin();
    const res = await post(s, await signed(claims(s)));
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe(`/student/practicals/${practicalId}`);
    expect(
      res.headers.getSetCookie().some((c) => c.startsWith('next-auth.session-token=') && /HttpOnly/.test(c) && /SameSite=Lax/.test(c)),
    ).toBe(true);
  });
});

describe('bad and hostile launches are refused with a clear page and write nothing', () => {
  const now = () => Math.floor(Date.now() / 1000);
  const cases: [string, number, string, (s: Started) => Promise<string>][] = [
    ['expired', 401, 'expired', async (s) => signed(claims(s, { iat: now() - 900, exp: now() - 600 }))],
    ['issued in the future (not yet valid)', 401, 'not-yet-valid', async (s) => signed(claims(s, { iat: now() + 900, exp: now() + 1200 }))],
    ['nbf in the future (not yet valid)', 401, 'not-yet-valid', async (s) => signed(claims(s, { nbf: now() + 900 }))],
    ['wrong audience', 401, 'wrong-audience', async (s) => signed(claims(s, { aud: 'some-other-tool', azp: 'some-other-tool' }))],
    [
      'several audiences without Oscillab as azp',
      401,
      'wrong-azp',
      async (s) => signed(claims(s, { aud: [CLIENT_ID, 'another-tool'], azp: 'another-tool' })),
    ],
    ['wrong issuer', 401, 'unknown-platform', async (s) => signed(claims(s, { iss: 'https://elsewhere.example' }))],
    ['unknown deployment', 401, 'unknown-deployment', async (s) => signed(claims(s, { [C.deploymentId]: 'some-other-deployment' }))],
    ['a nonce from another sign-in', 401, 'replayed', async (s) => signed(claims(s, { nonce: 'not-the-nonce-of-this-state' }))],
    [
      'alg: none',
      401,
      'algorithm-refused',
      async (s) => {
        const part = (o: object) => Buffer.from(JSON.stringify(o)).toString('base64url');
        return `${part({ alg: 'none', typ: 'JWT' })}.${part(claims(s))}.`;
      },
    ],
    [
      'HS256 keyed with the platform’s public key',
      401,
      'algorithm-refused',
      async (s) => {
        const { keys } = (await (await fetch(`${platform.url}/jwks`)).json()) as { keys: crypto.JsonWebKey[] };
        const pem = crypto.createPublicKey({ key: keys[0], format: 'jwk' }).export({ type: 'spki', format: 'pem' });
        return new SignJWT(claims(s))
          .setProtectedHeader({ alg: 'HS256', kid: String(keys[0].kid) })
          .sign(new TextEncoder().encode(String(pem)));
      },
    ],
    [
      'a key id the platform does not publish',
      401,
      'unknown-key',
      async (s) => {
        const { privateKey } = await generateKeyPair('RS256');
        return new SignJWT(claims(s)).setProtectedHeader({ alg: 'RS256', kid: 'not-a-platform-key' }).sign(privateKey);
      },
    ],
    [
      'the platform’s key id on a signature by another key',
      401,
      'bad-signature',
      async (s) => {
        const { keys } = (await (await fetch(`${platform.url}/jwks`)).json()) as { keys: { kid: string }[] };
        const { privateKey } = await generateKeyPair('RS256');
        return new SignJWT(claims(s)).setProtectedHeader({ alg: 'RS256', kid: keys[0].kid }).sign(privateKey);
      },
    ],
    ['an oversized token', 413, 'token-too-large', async (s) => signed(claims(s, { padding: 'x'.repeat(20_000) }))],
    ['no roles claim', 400, 'missing-claim', async (s) => signed(claims(s, { [C.roles]: undefined }))],
    ['no context claim', 400, 'missing-claim', async (s) => signed(claims(s, { [C.context]: undefined }))],
    ['no deployment id', 400, 'missing-claim', async (s) => signed(claims(s, { [C.deploymentId]: undefined }))],
    ['no resource link', 400, 'missing-claim', async (s) => signed(claims(s, { [C.resourceLink]: undefined }))],
    ['no nonce', 400, 'missing-claim', async (s) => signed(claims(s, { nonce: undefined }))],
    ['no sub', 400, 'missing-claim', async (s) => signed(claims(s, { sub: undefined }))],
    ['no version', 400, 'wrong-version', async (s) => signed(claims(s, { [C.version]: undefined }))],
    ['no message type', 400, 'unsupported-message', async (s) => signed(claims(s, { [C.messageType]: undefined }))],
    [
      'an item naming a practical of another course',
      403,
      'other-course',
      async (s) =>
        signed(claims(s, { [C.resourceLink]: { id: 'forged-item' }, [C.custom]: { oscillab_practical: String(foreignPracticalId) } })),
    ],
    [
      'an instructor role with an item naming another course’s practical',
      403,
      'other-course',
      async (s) =>
        signed(
          claims(s, {
            [C.roles]: ['http://purl.imsglobal.org/vocab/lis/v2/membership#Instructor'],
            [C.resourceLink]: { id: 'forged-item-2' },
            [C.custom]: { oscillab_practical: String(foreignPracticalId) },
          }),
        ),
    ],
    [
      'a course not connected to Oscillab',
      403,
      'course-not-connected',
      async (s) => signed(claims(s, { [C.context]: { id: 'some-other-course', title: 'Elsewhere' } })),
    ],
    [
      'a role Oscillab has nothing for (Mentor)',
      403,
      'no-role',
      async (s) =>
        signed(
          claims(
            s,
            { [C.roles]: ['http://purl.imsglobal.org/vocab/lis/v2/membership#Mentor'], sub: MENTOR, email: 'mentor@northmere.example' },
            MENTOR,
          ),
        ),
    ],
    [
      'an institution role only',
      403,
      'no-role',
      async (s) => signed(claims(s, { [C.roles]: ['http://purl.imsglobal.org/vocab/lis/v2/institution/person#Administrator'] })),
    ],
  ];
  for (const [name, status, code, token] of cases) {
    it(name, async () => {
      const s = await begin();
      const idToken = await token(s);
      await expectRefused(() => post(s, idToken), status, code);
    });
  }

  it('a replayed launch (the same token and state again)', async () => {
    const s = await begin();
    const token = await signed(claims(s));
    const kept = new Map(s.browser.jar.get('localhost'));
    expect((await post(s, token)).status).toBe(303);
    // The launch cleared the state cookie, so the same browser is refused at once…
    await expectRefused(() => post(s, token), 401, 'state-not-in-browser');
    // …and one that kept it (a copied cookie) meets the used-up nonce.
    s.browser.jar.set('localhost', kept);
    await expectRefused(() => post(s, token), 401, 'replayed');
  });

  it('a state this browser was not given (another browser’s sign-in)', async () => {
    const mine = await begin();
    const theirs = await begin();
    const token = await signed(claims(theirs));
    await expectRefused(() => post(mine, token, theirs.state), 401, 'state-not-in-browser');
    await expectRefused(() => post(mine, token, 'made-up-state'), 401, 'state-not-in-browser');
  });

  it('a form larger than Oscillab reads', async () => {
    const s = await begin();
    await expectRefused(() => post(s, 'x', s.state, { padding: 'y'.repeat(70_000) }), 413, 'form-too-large');
  });

  it('the platform’s own error answer', async () => {
    const s = await begin();
    const res = await expectRefused(
      () =>
        s.browser.go(`${OSCILLAB}/api/lti/launch`, {
          form: { error: 'login_required', error_description: '<script>alert(1)</script>', state: s.state },
          initiator: platform.url,
          follow: () => false,
        }),
      400,
      'platform-error',
    );
    expect(res.html).not.toContain('<script>alert');
    expect(res.html).toContain('&lt;script&gt;');
  });

  it('login initiations that are incomplete, from unknown platforms or aiming outside Oscillab', async () => {
    const b = new Browser();
    const q = (p: Record<string, string>) => `${OSCILLAB}/api/lti/login?${new URLSearchParams(p)}`;
    const good = { iss: platform.url, login_hint: STUDENT, target_link_uri: `${OSCILLAB}/api/lti/launch`, client_id: CLIENT_ID };
    await expectRefused(() => b.go(q({ ...good, iss: '' }), { follow: () => false }), 400, 'login-no-issuer');
    await expectRefused(() => b.go(q({ ...good, iss: 'https://elsewhere.example' }), { follow: () => false }), 401, 'unknown-platform');
    await expectRefused(
      () => b.go(q({ ...good, target_link_uri: 'https://evil.example/' }), { follow: () => false }),
      400,
      'login-foreign-target',
    );
    await expectRefused(() => b.go(q({ ...good, lti_deployment_id: 'nope' }), { follow: () => false }), 401, 'unknown-deployment');
    await expectRefused(() => b.go(q({ ...good, client_id: 'other' }), { follow: () => false }), 401, 'wrong-audience');
  });

  it('inside the platform’s frame, the login only offers a new window (no state, no cookie)', async () => {
    const before = await tableChecksums();
    const url = `${OSCILLAB}/api/lti/login?${new URLSearchParams({ iss: platform.url, login_hint: STUDENT, target_link_uri: `${OSCILLAB}/api/lti/launch`, client_id: CLIENT_ID })}`;
    const res = await fetch(url, { headers: { 'sec-fetch-dest': 'iframe' }, redirect: 'manual' });
    const html = await res.text();
    expect(res.status).toBe(200);
    expect(html).toContain('Open Oscillab in a new window');
    expect(html).toMatch(/target="_blank"/);
    expect(res.headers.getSetCookie()).toEqual([]);
    expect(await tableChecksums()).toEqual(before);
  });
});

describe('the platform’s key set unreachable', () => {
  it('refuses the launch politely (503), writes nothing, and the rest of Oscillab works; once back, launches work', async () => {
    forgetPlatformKeys();
    await platform.control('jwks', { down: true });
    try {
      const s = await begin();
      const res = await expectRefused(async () => post(s, await signed(claims(s))), 503, 'keyset-unreachable');
      expect(res.html).toContain('try again in a few minutes');
      expect((await health.GET(new Request(`${OSCILLAB}/api/health`), {})).status).toBe(200);
      expect((await jwks.GET(new Request(`${OSCILLAB}/api/lti/jwks`), {})).status).toBe(200);
      const signedIn = await me.GET(
        new Request(`${OSCILLAB}/api/me`, { headers: { cookie: await sessionCookie(w.people.instructor.id) } }),
        {},
      );
      expect(signedIn.status).toBe(200);
    } finally {
      await platform.control('jwks', { down: false });
    }
    const s = await begin();
    expect((await post(s, await signed(claims(s)))).status).toBe(303);
  });
});
