/**
 * Accessibility (issue 8, item 8): every main page of every role is scanned with axe-core against
 * WCAG 2.0/2.1 A and AA, and fails on any serious or critical violation; and a TA marks one
 * submission from the queue with the keyboard alone. Ids are found by following links in the UI.
 */
import fs from 'node:fs';
import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Page } from '@playwright/test';

const PASSWORD = 'northmere-demo-26';
const SHOTS = '/tmp/a11y';

async function signIn(page: Page, email: string) {
  await page.goto('/signin');
  await page.locator('#email').fill(email);
  await page.locator('#password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/signin'));
}

/** Scan the current page; returns a readable line per serious/critical violation (empty: passes). */
async function scan(page: Page, label: string): Promise<string[]> {
  await page.waitForLoadState('networkidle');
  const result = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze();
  const bad = result.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  return bad.map(
    (v) =>
      `${label} (${new URL(page.url()).pathname}): [${v.impact}] ${v.id} — ${v.help}\n` +
      v.nodes
        .map((n) => `    at ${n.target.join(' ')}${n.failureSummary ? `\n      ${n.failureSummary.replace(/\n/g, '\n      ')}` : ''}`)
        .join('\n'),
  );
}

/** Scan and record; the test fails at the end with every problem found, not just the first. */
function collector(page: Page) {
  const problems: string[] = [];
  return {
    async check(label: string) {
      problems.push(...(await scan(page, label)));
    },
    done() {
      expect(problems, problems.join('\n\n')).toEqual([]);
    },
  };
}

/** Follow the first link on the page whose href matches, and return the id captured by the pattern. */
async function follow(page: Page, pattern: RegExp): Promise<string> {
  const links = page.locator('a[href]');
  await expect(links.first()).toBeVisible();
  const hrefs = await links.evaluateAll((as) => as.map((a) => a.getAttribute('href') ?? ''));
  const href = hrefs.find((h) => pattern.test(h.split('?')[0]));
  expect(href, `a link matching ${pattern} on ${page.url()}`).toBeTruthy();
  await page.goto(href!);
  return pattern.exec(href!.split('?')[0])![1];
}

test.beforeAll(() => fs.mkdirSync(SHOTS, { recursive: true }));

test('signed-out pages have no serious accessibility violations', async ({ page }) => {
  const a11y = collector(page);
  await page.goto('/signin');
  await a11y.check('sign-in');
  // An invalid submission shows the error messages, which must pass too.
  await page.getByRole('button', { name: 'Sign in' }).click();
  await a11y.check('sign-in with errors');
  const reset = await page.goto('/reset');
  if (reset && reset.status() < 400) await a11y.check('reset');
  await page.goto('/not-permitted');
  await a11y.check('not-permitted');
  a11y.done();
});

test('student pages have no serious accessibility violations', async ({ page }) => {
  await signIn(page, 'student05@northmere.example');
  const a11y = collector(page);
  await page.goto('/student');
  await a11y.check('student home');
  await follow(page, /^\/student\/practicals\/(\d+)$/);
  await a11y.check('student practical');
  a11y.done();
});

test('TA pages have no serious accessibility violations', async ({ page }) => {
  await signIn(page, 'ta1@northmere.example');
  const a11y = collector(page);
  await page.goto('/marking');
  await expect(page.locator('tbody tr[data-submission]').first()).toBeVisible();
  await a11y.check('marking queue');
  await page.locator('tbody tr[data-submission] a').first().click();
  await page.waitForURL(/\/marking\/\d+$/);
  await expect(page.getByRole('heading', { name: 'Marks' })).toBeVisible();
  await a11y.check('marking screen');
  a11y.done();
});

test('instructor pages have no serious accessibility violations', async ({ page }) => {
  await signIn(page, 'instructor1@northmere.example');
  const a11y = collector(page);
  await page.goto('/courses');
  await a11y.check('courses');
  await follow(page, /^\/courses\/(\d+)$/);
  await a11y.check('course workspace');
  await follow(page, /^\/courses\/\d+\/practicals\/(\d+)$/);
  await a11y.check('practical editor');
  await page.goto('/moderation');
  await a11y.check('moderation');
  a11y.done();
});

test('course lead and admin pages have no serious accessibility violations', async ({ page, browser }) => {
  await signIn(page, 'lead@northmere.example');
  const a11y = collector(page);
  await page.goto('/statistics');
  await a11y.check('statistics');
  await follow(page, /^\/statistics\/(\d+)$/);
  // The dashboard draws its charts after its data arrives.
  await expect(page.getByTestId('box-plots').first()).toBeVisible();
  await a11y.check('practical statistics');
  a11y.done();

  // axe needs a page from a context it can open frames in: a fresh context, not browser.newPage().
  const context = await browser.newContext();
  const admin = await context.newPage();
  await signIn(admin, 'admin@northmere.example');
  const adminA11y = collector(admin);
  await admin.goto('/admin');
  await adminA11y.check('admin');
  adminA11y.done();
  await context.close();
});

test('a TA marks a submission with the keyboard alone', async ({ page }) => {
  test.setTimeout(120_000);
  await signIn(page, 'ta1@northmere.example');
  await page.goto('/marking');
  // Only submissions still to mark; the filter is a select reached and changed by keyboard.
  const status = page.locator('#q-status');
  await page.keyboard.press('Tab'); // skip link first
  await expect(page.getByRole('link', { name: 'Skip to content' })).toBeFocused();
  for (let i = 0; i < 30 && !(await status.evaluate((el) => el === document.activeElement)); i++) await page.keyboard.press('Tab');
  await expect(status).toBeFocused();
  await page.screenshot({ path: `${SHOTS}/queue-focus-select.png` });
  // Choose "Submitted" with the arrow keys (the option after "All").
  await page.keyboard.press('ArrowDown');
  await expect(status).toHaveValue('submitted');
  // Oldest first (Order: Ascending, the first option), so this test works on the earliest
  // submissions and leaves the newest ones, which tests/e2e/marking.spec.ts marks and releases.
  const order = page.locator('#q-dir');
  for (let i = 0; i < 5 && !(await order.evaluate((el) => el === document.activeElement)); i++) await page.keyboard.press('Tab');
  await expect(order).toBeFocused();
  await page.keyboard.press('ArrowUp');
  await expect(order).toHaveValue('asc');
  const rows = page.locator('tbody tr[data-submission]');
  await expect(rows.first()).toBeVisible();
  await expect(rows.filter({ hasNotText: 'Submitted' })).toHaveCount(0);
  expect(await rows.count()).toBeGreaterThan(2);

  // The queue keys are ignored inside form controls; Escape hands focus to the table of submissions.
  await page.keyboard.press('Escape');
  const region = page.getByRole('region', { name: 'Submissions' });
  await expect(region).toBeFocused();
  await expect(rows.nth(0)).toHaveAttribute('aria-current', 'true');

  // "a" accepts the proposal of the row under the cursor.
  const acceptedName = (await rows.nth(0).locator('a').first().innerText()).trim();
  await page.keyboard.press('a');
  await expect(page.getByTestId('queue-message')).toContainText(`${acceptedName}: proposal accepted`);
  await expect(page.getByTestId('queue-message')).toHaveAttribute('aria-live', 'polite');
  await page.waitForLoadState('networkidle'); // the queue reloads after the accept

  // j/k and the arrow keys move the cursor.
  await expect(rows.nth(0)).toHaveAttribute('aria-current', 'true');
  await page.keyboard.press('j');
  await expect(rows.nth(1)).toHaveAttribute('aria-current', 'true');
  await page.keyboard.press('k');
  await expect(rows.nth(0)).toHaveAttribute('aria-current', 'true');
  await page.keyboard.press('ArrowDown');
  await expect(rows.nth(1)).toHaveAttribute('aria-current', 'true');
  await page.screenshot({ path: `${SHOTS}/queue-cursor.png` });
  const chosen = await rows.nth(1).getAttribute('data-submission');

  // "r" opens the report of that row in a new tab.
  const [popup] = await Promise.all([page.waitForEvent('popup'), page.keyboard.press('r')]);
  await popup.waitForLoadState('domcontentloaded').catch(() => undefined);
  expect(popup.url()).toContain(`/api/marking/${chosen}/report`);
  await popup.close();
  await page.bringToFront();
  await expect(region).toBeFocused();

  await page.keyboard.press('Enter');
  await page.waitForURL(new RegExp(`/marking/${chosen}$`));
  await expect(page.getByRole('heading', { name: 'Marks' })).toBeVisible();

  // Tab to the first awarded-marks input in the form.
  const first = page.locator('tr[data-item] input[type=number]').first();
  await expect(first).toBeEnabled();
  let reached = false;
  for (let i = 0; i < 80 && !reached; i++) {
    await page.keyboard.press('Tab');
    reached = await first.evaluate((el) => el === document.activeElement);
  }
  expect(reached, 'the first awarded-marks field is reachable by Tab').toBe(true);
  await page.screenshot({ path: `${SHOTS}/marking-focus-input.png` });
  const row = page.locator('tr[data-item]').first();
  const proposed = Number(await first.inputValue());
  const max = Number(await first.getAttribute('max'));
  const next = proposed >= max ? max - 0.5 : proposed + 0.5;
  await page.keyboard.press('ControlOrMeta+a');
  await page.keyboard.type(String(next));
  await expect(first).toHaveValue(String(next));

  // The comment for that item is the next Tab stop; a changed mark needs one.
  await page.keyboard.press('Tab');
  await expect(row.locator('textarea')).toBeFocused();
  await page.keyboard.type('Keyboard check: half a mark changed for the working shown.');

  // Hand-marked items with no mark yet get one, still by keyboard.
  const handInputs = page.locator('tr[data-item^="rubric:"] input[type=number]');
  for (let i = 0; i < (await handInputs.count()); i++) {
    const hand = handInputs.nth(i);
    if (await hand.inputValue()) continue;
    for (let t = 0; t < 20 && !(await hand.evaluate((el) => el === document.activeElement)); t++) await page.keyboard.press('Tab');
    await expect(hand).toBeFocused();
    await page.keyboard.type('1');
  }

  // Tab on to "Save marks" and press Enter.
  const save = page.getByRole('button', { name: 'Save marks' });
  for (let t = 0; t < 40 && !(await save.evaluate((el) => el === document.activeElement)); t++) await page.keyboard.press('Tab');
  await expect(save).toBeFocused();
  await page.screenshot({ path: `${SHOTS}/marking-focus-save.png` });
  await page.keyboard.press('Enter');
  const live = page.getByTestId('marking-status');
  await expect(live).toHaveAttribute('aria-live', 'polite');
  await expect(live).toContainText(/Saved/);

  // The value is stored: a fresh load shows it and its comment.
  await page.reload();
  await expect(page.locator('tr[data-item] input[type=number]').first()).toHaveValue(String(next));
  await expect(page.locator('tr[data-item]').first().locator('textarea')).toHaveValue(/Keyboard check/);
});
