/**
 * The learning platform in the browser (issue 18), with the local stand-in (scripts/fake-platform.ts,
 * started by playwright.config.ts) and the seeded demo registration: an instructor places an item
 * by deep linking through Oscillab's chooser; a student launches it from the platform's page, where
 * Oscillab shows inside the platform's frame only an offer to open in its own window, and in that
 * window lands signed in on the practical; a TA launched from the platform releases a marked
 * submission and the score appears in the platform's gradebook, with its delivery shown on the
 * marking page. Screenshots at 1440×900 and 390×844 go to test-results/lti/.
 */
import { expect, test, type Page } from '@playwright/test';

const PLATFORM = process.env.E2E_PLATFORM_URL ?? 'http://127.0.0.1:3150';
const shots = 'test-results/lti';

async function shoot(page: Page, name: string) {
  for (const [w, h] of [
    [1440, 900],
    [390, 844],
  ] as const) {
    await page.setViewportSize({ width: w, height: h });
    await page.screenshot({ path: `${shots}/${name}-${w}.png`, fullPage: true });
  }
  await page.setViewportSize({ width: 1440, height: 900 });
}

test.describe.configure({ mode: 'serial' });

let itemId = '';

test('an instructor places an Oscillab practical in the platform course by deep linking', async ({ page }) => {
  await page.goto(`${PLATFORM}/`);
  await page.getByLabel(/Add an Oscillab item \(deep linking\) as/).selectOption({ label: 'Dr Owen Petrakis' });
  await page.getByRole('button', { name: 'Choose in Oscillab…' }).click();
  await page.waitForURL(/\/lti\/deep-link\?t=/);
  await expect(page.getByRole('heading', { name: 'Choose a practical for the learning platform' })).toBeVisible();
  await page.getByRole('radio', { name: /HCl\/DCl fundamental band.*2026 Autumn/ }).check();
  await shoot(page, 'deep-link-chooser');
  await page.getByRole('button', { name: 'Place in the learning platform' }).click();
  await page.waitForURL(`${PLATFORM}/deep-link/return`);
  await expect(page.getByRole('heading', { name: 'Item placed' })).toBeVisible();
  const state = await (await page.request.get(`${PLATFORM}/control/state`)).json();
  const item = state.items.find((i: { title: string }) => i.title === 'HCl/DCl fundamental band');
  expect(item.custom.oscillab_practical).toMatch(/^\d+$/);
  expect(item.lineItemId).toBeTruthy();
  itemId = item.id;
});

test('a student launches from the platform page: the frame offers a new window, which lands signed in on the practical', async ({
  page,
}) => {
  const violations: string[] = [];
  page.on('console', (m) => {
    if (/Refused to (frame|display)|frame-ancestors|X-Frame-Options/i.test(m.text())) violations.push(m.text());
  });
  await page.goto(`${PLATFORM}/launch?item=${encodeURIComponent(itemId)}`);
  await page.getByRole('button', { name: 'Launch as Amara Abernethy in the page' }).click();
  const frame = page.frameLocator('iframe[title="Oscillab"]');
  const open = frame.getByRole('link', { name: 'Open Oscillab in a new window' });
  await expect(open).toBeVisible();
  expect(violations).toEqual([]);
  await shoot(page, 'platform-frame');

  const [popup] = await Promise.all([page.waitForEvent('popup'), open.click()]);
  await popup.waitForURL(/\/student\/practicals\/\d+$/, { timeout: 30_000 });
  await expect(popup.getByRole('heading', { name: 'HCl/DCl fundamental band' })).toBeVisible();
  const me = await (await popup.request.get('/api/me')).json();
  expect(me.email).toBe('student01@northmere.example');
  // The session is Oscillab's own: SameSite=Lax, HttpOnly; the state cookie is gone.
  const cookies = await popup.context().cookies('http://localhost');
  const session = cookies.find((c) => c.name === 'next-auth.session-token');
  expect(session).toMatchObject({ httpOnly: true, sameSite: 'Lax' });
  expect(cookies.filter((c) => c.name.startsWith('oscillab-lti-state-'))).toEqual([]);
  await shoot(popup, 'student-landing');
});

test('a refused launch (a role Oscillab has nothing for) shows a clear page in the new window', async ({ page }) => {
  await page.goto(`${PLATFORM}/launch?item=${encodeURIComponent(itemId)}`);
  const [popup] = await Promise.all([
    page.waitForEvent('popup'),
    page.getByRole('button', { name: 'Launch as Casimir Dorn in a new window' }).click(),
  ]);
  await expect(popup.getByRole('heading', { name: 'Oscillab has nothing for your role here' })).toBeVisible({ timeout: 30_000 });
  await expect(popup.getByText('Mentor')).toBeVisible();
  await shoot(popup, 'refused-role');
});

test('a TA from the platform releases a marked submission; the score reaches the platform gradebook and shows as sent', async ({
  page,
}) => {
  test.setTimeout(120_000);
  // Vesna Whitlock (student22, Group B: the other browser tests use Group A's queue) launches once, so Oscillab knows her platform id.
  await page.goto(`${PLATFORM}/launch?item=${encodeURIComponent(itemId)}`);
  const [student] = await Promise.all([
    page.waitForEvent('popup'),
    page.getByRole('button', { name: 'Launch as Vesna Whitlock in a new window' }).click(),
  ]);
  await student.waitForURL(/\/student\/practicals\/\d+$/, { timeout: 30_000 });
  await student.close();
  await page.context().clearCookies();

  await page.goto(`${PLATFORM}/launch?item=${encodeURIComponent(itemId)}`);
  const [ta] = await Promise.all([
    page.waitForEvent('popup'),
    page.getByRole('button', { name: 'Launch as Tomas Vey in a new window' }).click(),
  ]);
  await ta.waitForURL(/\/marking$/, { timeout: 30_000 });
  const origin = new URL(ta.url()).origin;
  const queue = await (await ta.request.get('/api/marking/queue?sort=student&pageSize=100')).json();
  const row = queue.rows.find((r: { student: { name: string } }) => r.student.name === 'Vesna Whitlock');
  expect(row).toBeTruthy();
  const headers = { origin, 'content-type': 'application/json' };
  const accepted = await (await ta.request.post(`/api/marking/${row.id}/accept`, { headers, data: { version: row.version } })).json();
  const view = await (await ta.request.get(`/api/marking/${row.id}`)).json();
  const hand = view.marks
    .filter((m: { handMarked: boolean }) => m.handMarked)
    .map((m: { itemKey: string; maxMarks: number }) => ({ itemKey: m.itemKey, awarded: m.maxMarks - 1 }));
  const saved = await ta.request.put(`/api/marking/${row.id}`, { headers, data: { version: accepted.version, items: hand } });
  expect(saved.status()).toBe(200);
  const released = await (await ta.request.post('/api/release', { headers, data: { submissionIds: [row.id] } })).json();
  expect(released.released).toBe(1);

  // The in-process worker sends it (OUTBOX_INTERVAL_MS=500 in the browser-test server).
  await expect(async () => {
    await page.goto(`${PLATFORM}/gradebook`);
    await expect(page.locator('td[data-score]')).toHaveCount(1, { timeout: 1000 });
  }).toPass({ timeout: 30_000 });
  const cell = page.locator('tr', { hasText: 'Vesna Whitlock' }).locator('td[data-score]');
  const total = (await (await ta.request.get(`/api/marking/${row.id}`)).json()).submission.awardedTotal;
  await expect(cell).toHaveAttribute('data-score', String(total));
  await shoot(page, 'platform-gradebook');

  await ta.goto(`/marking/${row.id}`);
  const delivery = ta.getByRole('region', { name: 'Learning-platform gradebook' });
  await expect(delivery.locator('tr[data-score-delivery="sent"]')).toHaveCount(1);
  await expect(delivery).toContainText('Sent');
  await delivery.scrollIntoViewIfNeeded();
  await shoot(ta, 'marking-score-delivery');
});

test('the administrator sees the URLs to copy; the instructor compares the course with the platform roster (writing nothing)', async ({
  page,
}) => {
  await page.goto('/signin');
  await page.locator('#email').fill('admin@northmere.example');
  await page.locator('#password').fill('northmere-demo-26');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/signin'));
  await page.goto('/admin/learning-platform');
  await expect(page.locator('[data-copy="login"]')).toHaveText(/\/api\/lti\/login$/);
  await expect(page.locator('[data-copy="jwks"]')).toHaveText(/\/api\/lti\/jwks$/);
  await expect(page.locator('[data-registration="oscillab-northmere"]')).toContainText(PLATFORM);
  await shoot(page, 'admin-learning-platform');
  await page.context().clearCookies();

  await page.goto('/signin');
  await page.locator('#email').fill('instructor1@northmere.example');
  await page.locator('#password').fill('northmere-demo-26');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/signin'));
  await page.goto('/courses');
  await page
    .getByRole('link', { name: /CHEM2041/ })
    .first()
    .click();
  await page.getByRole('link', { name: 'Learning platform' }).click();
  await page.getByRole('button', { name: 'Compare with the platform' }).click();
  const table = page.getByRole('table', { name: 'Roster comparison' });
  await expect(table.locator('tr[data-roster="new"]').filter({ hasText: 'Ottilie Frane' })).toHaveCount(1);
  await expect(table.locator('tr[data-roster="leaving"]').filter({ hasText: 'Elin Dunmore' })).toHaveCount(1);
  await expect(table.locator('tr[data-roster="changed"]').filter({ hasText: 'Bram Hartigan-Lowe' })).toHaveCount(1);
  await expect(page.getByText('Nothing has been written yet.')).toBeVisible();
  await shoot(page, 'course-roster-preview');
});
