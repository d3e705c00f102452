/**
 * Web security of the production build (issue 8, item 4): security headers, the app working under
 * its content security policy, cookie flags (plain and on an instance whose public URL is https),
 * cross-site writes refused, and the forgot-password flow saying the same for every address.
 */
import fs from 'node:fs';
import net from 'node:net';
import { test, expect, request as playwrightRequest, type Page, type APIResponse, type APIRequestContext } from '@playwright/test';
import { mailTo, waitForMail } from '../helpers/maildev';

// Demo accounts from the seeders (fictional Northmere University).
const PASSWORD = 'northmere-demo-26';
/** The second server of playwright.config.ts: same build, NEXTAUTH_URL=https://… (next-auth then uses secure cookies). */
const SECURE_URL = process.env.E2E_SECURE_URL ?? 'http://localhost:3101';

async function signIn(page: Page, email: string, password = PASSWORD) {
  await page.goto('/signin');
  await page.locator('#email').fill(email);
  await page.locator('#password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

/**
 * Collects content-security-policy violations: Chromium's own console reports, plus every
 * 'securitypolicyviolation' event, which a script added before the page's own echoes to the console.
 */
async function watchPolicy(page: Page): Promise<string[]> {
  const violations: string[] = [];
  page.on('console', (message) => {
    const text = message.text();
    if (/Content Security Policy|\[csp-violation\]/i.test(text)) violations.push(text);
  });
  page.on('pageerror', (error) => {
    if (/Content Security Policy|unsafe-eval/i.test(error.message)) violations.push(error.message);
  });
  await page.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (event) => {
      console.error(`[csp-violation] ${event.effectiveDirective} blocked ${event.blockedURI || 'inline'} on ${location.pathname}`);
    });
  });
  return violations;
}

/** Let client scripts run: hydration, data fetches, lazy chunks. */
async function settle(page: Page) {
  await page.waitForLoadState('networkidle');
  await page.waitForTimeout(300);
}

function directives(csp: string): Map<string, string[]> {
  const map = new Map<string, string[]>();
  for (const part of csp
    .split(';')
    .map((p) => p.trim())
    .filter(Boolean)) {
    const [name, ...values] = part.split(/\s+/);
    map.set(name.toLowerCase(), values);
  }
  return map;
}

function setCookies(response: APIResponse): string[] {
  return response
    .headersArray()
    .filter((h) => h.name.toLowerCase() === 'set-cookie')
    .map((h) => h.value);
}

/** next-auth's credentials callback on the https-URL server; returns the Set-Cookie lines of the answer. */
async function signInAt(api: APIRequestContext, csrfToken: string, csrfCookie: string, email: string): Promise<string[]> {
  const res = await api.post('/api/auth/callback/credentials', {
    form: { csrfToken, email, password: PASSWORD, json: 'true' },
    headers: { cookie: `__Host-next-auth.csrf-token=${csrfCookie}` },
    maxRedirects: 0,
  });
  return setCookies(res);
}

/** Signs in on the https-URL server and returns the session token. */
async function signInSecure(api: APIRequestContext, email: string): Promise<string> {
  const csrf = await api.get('/api/auth/csrf');
  const { csrfToken } = await csrf.json();
  const csrfCookie = cookieNamed(setCookies(csrf), '__Host-next-auth.csrf-token')!;
  const session = cookieNamed(await signInAt(api, csrfToken, cookieValue(csrfCookie), email), '__Secure-next-auth.session-token');
  if (!session) throw new Error(`sign-in failed for ${email}`);
  return cookieValue(session);
}

const cookieNamed = (lines: string[], name: string) => lines.find((l) => l.startsWith(`${name}=`));
const cookieValue = (line: string) => line.slice(line.indexOf('=') + 1).split(';')[0];
const attributes = (line: string) =>
  line
    .split(';')
    .slice(1)
    .map((a) => a.trim().toLowerCase());

test.describe('security headers', () => {
  for (const path of ['/signin', '/reset', '/api/me', '/fonts/DejaVuSans.ttf']) {
    test(`${path} carries the security headers and a strict policy`, async ({ request }) => {
      const res = await request.get(path, { maxRedirects: 0 });
      const headers = res.headers();
      expect(headers['x-frame-options']).toBe('DENY');
      expect(headers['x-content-type-options']).toBe('nosniff');
      expect(headers['referrer-policy']).toMatch(/^(same-origin|strict-origin|strict-origin-when-cross-origin|no-referrer)$/);
      expect(headers['x-powered-by']).toBeUndefined();
      const csp = headers['content-security-policy'];
      expect(csp, 'Content-Security-Policy header').toBeTruthy();
      const policy = directives(csp);
      expect(policy.get('default-src')).toEqual(["'self'"]);
      expect(policy.get('frame-ancestors')).toEqual(["'none'"]);
      expect(policy.get('base-uri')).toEqual(["'self'"]);
      expect(policy.get('form-action')).toEqual(["'self'"]);
      // Scripts: this origin, plus the inline bootstrap Next's App Router streams; nothing else.
      const scripts = policy.get('script-src') ?? [];
      expect(scripts).toContain("'self'");
      expect(scripts).not.toContain("'unsafe-eval'");
      expect(scripts.filter((s) => s !== "'self'" && s !== "'unsafe-inline'")).toEqual([]);
      expect(csp).not.toMatch(/(^|\s)\*(\s|;|$)|https?:/);
      for (const name of ['connect-src', 'img-src', 'font-src', 'style-src']) {
        expect(policy.get(name), name).toContain("'self'");
        expect(
          policy.get(name)!.some((v) => /^https?:|^\*$/.test(v)),
          `${name} names no other host`,
        ).toBe(false);
      }
    });
  }
});

test('only the report PDF may be framed, and only by this site, still sandboxed', async ({ request }) => {
  const res = await request.get('/api/marking/1/report');
  expect(res.status()).toBe(401);
  expect(res.headers()['x-frame-options']).toBe('SAMEORIGIN');
  const policy = directives(res.headers()['content-security-policy']);
  expect(policy.get('frame-ancestors')).toEqual(["'self'"]);
  expect(policy.has('sandbox')).toBe(true);
  expect(policy.get('default-src')).toEqual(["'none'"]);
  // Its neighbours keep the site-wide denial.
  const other = await request.get('/api/marking/1/preview');
  expect(other.headers()['x-frame-options']).toBe('DENY');
});

test.describe('the app works under its content security policy', () => {
  test('the violation detector itself sees a blocked image and a blocked eval', async ({ page }) => {
    const violations = await watchPolicy(page);
    await page.goto('/signin');
    await settle(page);
    expect(violations).toEqual([]);
    // The same page with a hostile image and an eval added to its HTML, under the server's own headers:
    // the inline script runs (the framework's exception) but its eval is refused, and both are reported.
    await page.route('**/signin', async (route) => {
      const response = await route.fetch();
      const html = (await response.text()).replace(
        '</body>',
        `<script>try { eval('1 + 1'); window.__evalRan = true; } catch (e) { window.__evalRan = false; }</script><img src="https://evil.example/pixel.png" alt=""></body>`,
      );
      await route.fulfill({ response, body: html });
    });
    await page.goto('/signin');
    await settle(page);
    expect(await page.evaluate(() => (window as unknown as { __evalRan?: boolean }).__evalRan)).toBe(false);
    await expect.poll(() => violations.some((v) => /img-src/.test(v) && /evil\.example/.test(v))).toBe(true);
    await expect.poll(() => violations.some((v) => /script-src/.test(v) && /eval/.test(v))).toBe(true);
  });

  const journeys: [string, string, RegExp][] = [
    ['student07@northmere.example', '/student', /My practicals/],
    ['ta1@northmere.example', '/marking', /Marking/],
    ['instructor1@northmere.example', '/courses', /Courses & practicals/],
    ['lead@northmere.example', '/statistics', /Cohort statistics/],
  ];
  for (const [email, home, heading] of journeys) {
    test(`sign-in and ${home} for ${email} raise no policy violation`, async ({ page }) => {
      const violations = await watchPolicy(page);
      await page.goto('/signin');
      await settle(page);
      await signIn(page, email);
      await expect(page).toHaveURL(new RegExp(`${home}$`));
      await expect(page.getByRole('heading', { level: 1, name: heading })).toBeVisible();
      await settle(page);
      // One more page of that role, reached by its own navigation link when there is one.
      const firstLink = page.locator(`main a[href^="${home}/"]`).first();
      if (await firstLink.count()) {
        await firstLink.click();
        await settle(page);
      }
      expect(violations).toEqual([]);
    });
  }

  test('the forgot-password pages raise no policy violation', async ({ page }) => {
    const violations = await watchPolicy(page);
    await page.goto('/reset');
    await settle(page);
    await page.goto('/reset/not-a-real-token-but-long-enough');
    await settle(page);
    expect(violations).toEqual([]);
  });
});

test.describe('cookies', () => {
  test('the session cookie is HttpOnly and SameSite=Lax', async ({ page, context }) => {
    const callback = page.waitForResponse((r) => r.url().includes('/api/auth/callback/credentials'));
    await signIn(page, 'student08@northmere.example');
    const raw = await (await callback).headersArray();
    await expect(page).toHaveURL(/\/student$/);
    const session = raw
      .filter((h) => h.name.toLowerCase() === 'set-cookie')
      .map((h) => h.value)
      .find((v) => v.startsWith('next-auth.session-token='));
    expect(session, 'Set-Cookie for the session').toBeTruthy();
    expect(attributes(session!)).toEqual(expect.arrayContaining(['httponly', 'samesite=lax', 'path=/']));

    const cookies = await context.cookies();
    const stored = cookies.find((c) => c.name === 'next-auth.session-token');
    expect(stored).toMatchObject({ httpOnly: true, sameSite: 'Lax' });
    // Nothing the page's scripts can read holds the session.
    expect(await page.evaluate(() => document.cookie)).not.toMatch(/session-token/);
  });

  test('behind an https URL, next-auth cookies are Secure with __Secure-/__Host- names, and the app accepts them', async () => {
    const api = await playwrightRequest.newContext({
      baseURL: SECURE_URL,
      extraHTTPHeaders: { origin: SECURE_URL.replace('http://', 'https://') },
    });
    try {
      const csrf = await api.get('/api/auth/csrf');
      expect(csrf.status()).toBe(200);
      const { csrfToken } = await csrf.json();
      const first = setCookies(csrf);
      const csrfCookie = cookieNamed(first, '__Host-next-auth.csrf-token');
      expect(csrfCookie, first.join('\n')).toBeTruthy();
      expect(attributes(csrfCookie!)).toEqual(expect.arrayContaining(['httponly', 'secure', 'samesite=lax', 'path=/']));
      // __Host- cookies must not name a domain.
      expect(attributes(csrfCookie!).some((a) => a.startsWith('domain='))).toBe(false);
      expect(first.some((l) => l.startsWith('next-auth.csrf-token='))).toBe(false);

      const second = await signInAt(api, csrfToken, cookieValue(csrfCookie!), 'student09@northmere.example');
      const session = cookieNamed(second, '__Secure-next-auth.session-token');
      expect(session, second.join('\n')).toBeTruthy();
      expect(attributes(session!)).toEqual(expect.arrayContaining(['httponly', 'secure', 'samesite=lax', 'path=/']));
      expect(second.some((l) => l.startsWith('next-auth.session-token='))).toBe(false);
      for (const line of [...first, ...second].filter((l) => /next-auth/.test(l))) {
        expect(line, 'every next-auth cookie is Secure and prefixed').toMatch(/^__(Secure|Host)-/);
        expect(attributes(line)).toContain('secure');
      }

      const me = await api.get('/api/me', { headers: { cookie: `__Secure-next-auth.session-token=${cookieValue(session!)}` } });
      expect(me.status()).toBe(200);
      expect((await me.json()).email).toBe('student09@northmere.example');
    } finally {
      await api.dispose();
    }
  });
});

test.describe('cross-site requests', () => {
  test('a POST to an API route from another origin gets 403; the same request from this origin is judged on its content', async ({
    page,
    baseURL,
  }) => {
    await signIn(page, 'instructor1@northmere.example');
    await expect(page).toHaveURL(/\/courses$/);
    // page.request shares the signed-in cookies, as a forged request riding on the session would.
    const evil = await page.request.post('/api/courses', { data: { code: 'X', title: '' }, headers: { origin: 'https://evil.example' } });
    expect(evil.status()).toBe(403);
    expect((await evil.json()).error).toMatch(/Cross-site request refused/);
    const noOrigin = await page.request.post('/api/courses', {
      data: { code: 'X', title: '' },
      headers: { 'sec-fetch-site': 'cross-site' },
    });
    expect(noOrigin.status()).toBe(403);
    const own = await page.request.post('/api/courses', { data: { code: 'X', title: '' }, headers: { origin: baseURL! } });
    expect(own.status()).toBe(400);

    const reset = await page.request.post('/api/password-reset', {
      data: { email: 'student10@northmere.example' },
      headers: { origin: 'https://evil.example' },
    });
    expect(reset.status()).toBe(403);
  });

  test('a form on another site posting into Oscillab is refused by the browser-sent Origin', async ({ page, baseURL }) => {
    // A page with an opaque origin, as a hostile site's form would be.
    await page.setContent(
      `<form method="post" action="${baseURL}/api/password-reset" enctype="text/plain"><input name='{"email":"student10@northmere.example","x":"' value='"}'><button>go</button></form>`,
    );
    const [response] = await Promise.all([
      page.waitForResponse(`${baseURL}/api/password-reset`),
      page.getByRole('button', { name: 'go' }).click(),
    ]);
    expect(response.status()).toBe(403);
  });
});

test.describe('forgot password', () => {
  async function ask(page: Page, email: string): Promise<string> {
    await page.goto('/signin');
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    await expect(page).toHaveURL(/\/reset$/);
    await expect(page.getByRole('heading', { name: 'Reset your password' })).toBeVisible();
    await page.getByLabel('E-mail').fill(email);
    await page.getByRole('button', { name: 'Send me a reset link' }).click();
    const status = page.getByTestId('reset-sent');
    await expect(status).toBeVisible();
    return (await status.textContent()) ?? '';
  }

  test('shows the same message for a known and an unknown address', async ({ page }) => {
    const known = await ask(page, 'student07@northmere.example');
    const unknown = await ask(page, `nobody-${Date.now()}@northmere.example`);
    expect(known).toMatch(/If that address belongs to an Oscillab account/);
    expect(unknown).toBe(known);
    await expect(page.locator('form [role=alert]')).toHaveCount(0);
  });

  test('a malformed address is refused in the form, before anything is sent', async ({ page }) => {
    const sent: string[] = [];
    page.on('request', (r) => r.url().includes('/api/password-reset') && sent.push(r.url()));
    await page.goto('/reset');
    await page.getByLabel('E-mail').fill('not an address');
    await page.getByRole('button', { name: 'Send me a reset link' }).click();
    await expect(page.getByText('Enter an e-mail address.')).toBeVisible();
    expect(sent).toEqual([]);
  });

  test('the e-mailed link sets a new password once, and the new password signs in', async ({ browser, baseURL }) => {
    const email = 'student58@northmere.example';
    const newPassword = `band-head-${Date.now() % 100000}-reset`;
    const context = await browser.newContext({ baseURL });
    const page = await context.newPage();
    const before = (await mailTo(email)).length;
    await page.goto('/reset');
    await page.getByLabel('E-mail').fill(email);
    await page.getByRole('button', { name: 'Send me a reset link' }).click();
    await expect(page.getByTestId('reset-sent')).toBeVisible();

    const mails = await waitForMail(email, before + 1, 30_000);
    expect(mails.length, 'reset e-mail in the catcher').toBe(before + 1);
    const link = /https?:\/\/\S+\/reset\/[A-Za-z0-9_-]+/.exec(mails[mails.length - 1].text)![0];
    const path = new URL(link).pathname;

    await page.goto(path);
    await expect(page.getByRole('heading', { name: 'Choose a new password' })).toBeVisible();
    await page.getByLabel('New password', { exact: true }).fill('abababababab');
    await page.getByLabel('The same password again').fill('abababababab');
    await page.getByRole('button', { name: 'Set password' }).click();
    await expect(page.locator('form [role=alert]')).toContainText('at least 4 different characters');

    await page.getByLabel('New password', { exact: true }).fill(newPassword);
    await page.getByLabel('The same password again').fill(newPassword);
    await page.getByRole('button', { name: 'Set password' }).click();
    await expect(page.locator('section [role=status]')).toContainText('Your password is set');

    await page.goto(path);
    await expect(page.locator('section [role=alert]')).toContainText('already been used');

    await signIn(page, email, newPassword);
    await expect(page).toHaveURL(/\/student$/);
    await context.close();
  });
});

test.describe('slow uploads', () => {
  /** Sends the start of a multipart upload over a raw socket, then nothing more; resolves with what the server answers. */
  function stalledUpload(url: string, cookie: string): Promise<{ head: string; body: string; afterMs: number }> {
    const { hostname, port } = new URL(url);
    const boundary = 'oscillabstalledupload';
    const start = `--${boundary}\r\nContent-Disposition: form-data; name="kind"\r\n\r\nreport\r\n--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="stalled.pdf"\r\nContent-Type: application/pdf\r\n\r\n%PDF-1.4\n`;
    return new Promise((resolve, reject) => {
      const socket = net.connect(Number(port), hostname);
      let answer = '';
      let sentAt = 0;
      const done = () => {
        const split = answer.indexOf('\r\n\r\n');
        resolve({ head: answer.slice(0, split), body: answer.slice(split + 4), afterMs: Date.now() - sentAt });
        socket.destroy();
      };
      socket.setTimeout(30_000, () => reject(new Error(`no answer within 30 s; got: ${answer}`)));
      socket.on('error', reject);
      socket.on('connect', () => {
        socket.write(
          [
            `POST /api/uploads HTTP/1.1`,
            `Host: ${hostname}:${port}`,
            `Origin: ${url}`,
            `Cookie: ${cookie}`,
            `Content-Type: multipart/form-data; boundary=${boundary}`,
            `Content-Length: 200000`,
            '',
            '',
          ].join('\r\n') + start,
        );
        sentAt = Date.now();
      });
      socket.on('data', (chunk) => {
        answer += chunk.toString('utf8');
        // The JSON body is short: the first complete answer is enough.
        if (/\r\n\r\n[\s\S]*\}\s*$/.test(answer) || /\r\n0\r\n\r\n$/.test(answer)) done();
      });
      socket.on('end', done);
    });
  }

  test('an upload that stalls is answered 408 by the server after its idle limit, and leaves no partial file', async () => {
    const api = await playwrightRequest.newContext({
      baseURL: SECURE_URL,
      extraHTTPHeaders: { origin: SECURE_URL.replace('http://', 'https://') },
    });
    try {
      const session = await signInSecure(api, 'student10@northmere.example');
      const partials = () =>
        fs.existsSync(process.env.UPLOAD_DIR!) ? fs.readdirSync(process.env.UPLOAD_DIR!).filter((f) => f.endsWith('.part')) : [];
      const before = partials();
      const answer = await stalledUpload(SECURE_URL, `__Secure-next-auth.session-token=${session}`);
      expect(answer.head.split('\r\n')[0]).toBe('HTTP/1.1 408 Request Timeout');
      expect(answer.body).toMatch(/stalled \(nothing arrived for 2 s\)/);
      // Cut off at the configured idle limit (2 s on this server), not left to the client.
      expect(answer.afterMs).toBeGreaterThanOrEqual(1_900);
      expect(answer.afterMs).toBeLessThan(15_000);
      await expect.poll(partials).toEqual(before);
    } finally {
      await api.dispose();
    }
  });
});
