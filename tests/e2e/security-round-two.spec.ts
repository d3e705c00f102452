/**
 * Security and robustness, round two (issue 14), in the browser against the production build:
 * the student's report PDF is still shown to the TA inside the app under its sandboxed policy;
 * signing out ends the session (a copied cookie stops working) and "sign out everywhere" ends every
 * session; a client's own X-Forwarded-For does not make it a new address; the administrator opens
 * moderation; user files and pages carry the policies the issue asked for.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { expect, test, type Browser, type Page } from '@playwright/test';
import { PDFDocument, StandardFonts } from 'pdf-lib';

const PASSWORD = 'northmere-demo-26'; // demo accounts, fictional Northmere University (seeders)

async function signIn(page: Page, email: string) {
  await page.goto('/signin');
  await page.locator('#email').fill(email);
  await page.locator('#password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/signin'));
}

async function sessionCookieOf(page: Page): Promise<string> {
  const cookie = (await page.context().cookies()).find((c) => /session-token$/.test(c.name));
  if (!cookie) throw new Error('no session cookie');
  return `${cookie.name}=${cookie.value}`;
}

/** /api/me with a given Cookie header, from outside any browser (as someone holding a copy would). */
async function meWith(browser: Browser, baseURL: string, cookie: string): Promise<number> {
  const ctx = await browser.newContext({ baseURL });
  const res = await ctx.request.get('/api/me', { headers: { cookie } });
  await ctx.close();
  return res.status();
}

/** Runs SQL on the e2e database (scripts/e2e.sh: a fresh SQLite file named by DATABASE_URL). */
async function sql(statement: string, values: unknown[] = []): Promise<Record<string, unknown>[]> {
  const { default: sqlite3 } = await import('sqlite3');
  const file = (process.env.DATABASE_URL ?? '').replace(/^sqlite:/, '');
  const db = new sqlite3.Database(file);
  try {
    return await new Promise((resolve, reject) =>
      db.all(statement, values, (err: Error | null, rows: Record<string, unknown>[]) => (err ? reject(err) : resolve(rows))),
    );
  } finally {
    db.close();
  }
}

test('the report PDF is shown to the TA inside the marking page, under its sandboxed policy', async ({ page }) => {
  await page.setViewportSize({ width: 1440, height: 900 });
  await signIn(page, 'ta1@northmere.example');
  const queue = await (await page.request.get('/api/marking/queue?pageSize=5')).json();
  const row = queue.rows[0];
  expect(row, 'ta1 has submissions to mark in the seeded demo').toBeTruthy();
  // A report PDF as a student would upload it, attached to that submission.
  const doc = await PDFDocument.create();
  const font = await doc.embedFont(StandardFonts.Helvetica);
  doc.addPage([595, 842]).drawText('Lab report: HCl fundamental band', { x: 50, y: 760, size: 24, font });
  const bytes = Buffer.from(await doc.save());
  const storedName = `${crypto.randomBytes(16).toString('hex')}.pdf`;
  fs.writeFileSync(path.join(process.env.UPLOAD_DIR!, storedName), bytes);
  const now = new Date().toISOString().replace('T', ' ').replace('Z', ' +00:00');
  const [sub] = await sql('SELECT "studentId" FROM "submissions" WHERE "id" = ?', [row.id]);
  await sql(
    'INSERT INTO "uploads" ("ownerId", "submissionId", "kind", "originalName", "storedName", "sha256", "size", "contentType", "createdAt", "updatedAt") VALUES (?, ?, \'report\', \'report.pdf\', ?, ?, ?, \'application/pdf\', ?, ?)',
    [sub.studentId, row.id, storedName, crypto.createHash('sha256').update(bytes).digest('hex'), bytes.length, now, now],
  );

  const reportResponse = page.waitForResponse((r) => r.url().endsWith(`/api/marking/${row.id}/report`));
  await page.goto(`/marking/${row.id}`);
  expect((await reportResponse).status()).toBe(200);
  // The headers as the server sends them (the viewer's own navigation reports them differently).
  const headers = (await page.request.get(`/api/marking/${row.id}/report`)).headers();
  expect(headers['content-security-policy']).toMatch(/^sandbox; default-src 'none'; object-src 'none'; frame-ancestors 'self'/);
  expect(headers['x-frame-options']).toBe('SAMEORIGIN');
  const frame = page.locator(`iframe[src="/api/marking/${row.id}/report"]`);
  await frame.scrollIntoViewIfNeeded();
  await expect(frame).toBeVisible();
  // Chromium shows a PDF through its built-in viewer, which runs in a frame of its own inside ours;
  // a frame the browser refused would hold an error page instead.
  await expect.poll(() => page.frames().some((f) => f.url().startsWith('chrome-extension://')), { timeout: 15_000 }).toBe(true);
  expect(page.frames().some((f) => f.url().startsWith('chrome-error://'))).toBe(false);
  const reportFrame = page.frames().find((f) => f.url().endsWith(`/api/marking/${row.id}/report`))!;
  expect(await reportFrame.evaluate(() => document.contentType)).toBe('application/pdf');
  await page.waitForTimeout(1000);
  await frame.screenshot({ path: test.info().outputPath('report-in-marking-page.png') });
});

test('signing out ends the session: a cookie copied before sign-out no longer works', async ({ page, browser, baseURL }) => {
  await signIn(page, 'student11@northmere.example');
  const copied = await sessionCookieOf(page);
  expect(await meWith(browser, baseURL!, copied)).toBe(200);
  await page.getByRole('button', { name: 'Sign out', exact: true }).click();
  await page.waitForURL(/\/signin/);
  expect(await meWith(browser, baseURL!, copied)).toBe(401);
});

test('"Sign out everywhere" in the account menu ends the sessions on other devices too', async ({ browser, baseURL }) => {
  const laptop = await browser.newPage({ viewport: { width: 390, height: 844 } });
  const phone = await browser.newPage();
  await signIn(laptop, 'student12@northmere.example');
  await signIn(phone, 'student12@northmere.example');
  const phoneCookie = await sessionCookieOf(phone);
  expect(await meWith(browser, baseURL!, phoneCookie)).toBe(200);
  await laptop.getByTestId('signed-in-as').click();
  await expect(laptop.getByRole('button', { name: 'Sign out everywhere' })).toBeVisible();
  await laptop.screenshot({ path: test.info().outputPath('account-menu-390.png') });
  await laptop.getByRole('button', { name: 'Sign out everywhere' }).click();
  await laptop.waitForURL(/\/signin/);
  expect(await meWith(browser, baseURL!, phoneCookie)).toBe(401);
  await phone.reload();
  await expect(phone).toHaveURL(/\/signin/);
  // Signing in again works.
  await signIn(phone, 'student12@northmere.example');
  expect(await meWith(browser, baseURL!, await sessionCookieOf(phone))).toBe(200);
  await laptop.close();
  await phone.close();
});

test('a client cannot become a new address by writing X-Forwarded-For: the (account, address) block holds', async ({
  browser,
  baseURL,
}) => {
  // Five wrong passwords for one account (the pair limit), each claiming another address; then the right password
  // with yet another claimed address. Without a trusted proxy every one of them is this connection.
  const ctx = await browser.newContext({ baseURL });
  const email = 'student59@northmere.example';
  const attempt = async (password: string, claimed: string) => {
    const csrf = await (await ctx.request.get('/api/auth/csrf')).json();
    const res = await ctx.request.post('/api/auth/callback/credentials', {
      form: { csrfToken: csrf.csrfToken, email, password, json: 'true' },
      headers: { 'x-forwarded-for': claimed },
      maxRedirects: 0,
    });
    // next-auth answers a JSON sign-in with the address it would redirect to.
    return res.headers()['location'] ?? String((await res.json()).url ?? '');
  };
  for (let i = 0; i < 5; i++) expect(await attempt(`wrong-guess-${i}`, `198.51.100.${i}`)).toMatch(/error=CredentialsSignin/);
  expect(await attempt(PASSWORD, '203.0.113.200')).toMatch(/error=throttled/);
  await ctx.close();
});

test('the administrator opens the moderation page, as its API allows', async ({ page }) => {
  await signIn(page, 'admin@northmere.example');
  await page.goto('/moderation');
  await expect(page).toHaveURL(/\/moderation/);
  await expect(page.getByRole('heading', { name: 'Moderation' })).toBeVisible();
});

test("pages carry object-src 'none'; user files a sandboxed policy of their own", async ({ request }) => {
  const page = await request.get('/signin');
  expect(page.headers()['content-security-policy']).toContain("object-src 'none'");
  for (const p of ['/api/uploads/1', '/api/marking/1/preview', '/api/submissions/1/feedback']) {
    const res = await request.get(p);
    expect(res.status(), p).toBe(401);
    expect(res.headers()['content-security-policy'], p).toMatch(/^sandbox; default-src 'none'; object-src 'none'/);
  }
});
