/**
 * Every main page of every role on a phone (390 × 844, an ordinary phone in portrait): no page
 * scrolls sideways (document scrollWidth ≤ window innerWidth), with a full-page screenshot of each
 * kept as a test artifact (test-results/…/<page>.png, attached to the report). Wide tables may
 * scroll inside their own labelled box; the page itself may not. Ids are found by following links.
 */
import { expect, test, type Page, type TestInfo } from '@playwright/test';
import { markInBrowser } from './mark-in-browser';

const PASSWORD = 'northmere-demo-26';

test.use({ viewport: { width: 390, height: 844 }, deviceScaleFactor: 1, isMobile: true, hasTouch: true });

async function signIn(page: Page, email: string) {
  await page.goto('/signin');
  await page.locator('#email').fill(email);
  await page.locator('#password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/signin'));
}

/** The first link on the page whose path matches. */
async function linkTo(page: Page, pattern: RegExp): Promise<string> {
  const hrefs = await page.locator('a[href]').evaluateAll((as) => as.map((a) => a.getAttribute('href') ?? ''));
  const href = hrefs.find((h) => pattern.test(h.split(/[?#]/)[0]));
  expect(href, `a link matching ${pattern} on ${page.url()}`).toBeTruthy();
  return href!;
}

/** Open a page, let its data arrive, and check that it fits; the screenshot is kept either way. */
async function fits(page: Page, info: TestInfo, path: string, name: string, problems: string[]) {
  await page.goto(path);
  await page.waitForLoadState('networkidle');
  await page.waitForTimeout(200); // client parts (SWR tables) settle after the data arrives
  const { scrollWidth, innerWidth, wide } = await page.evaluate(() => ({
    scrollWidth: document.documentElement.scrollWidth,
    innerWidth: window.innerWidth,
    // What sticks out, to make a failure readable.
    wide: [...document.querySelectorAll('body *')]
      .filter((el) => el.getBoundingClientRect().right > window.innerWidth + 1 && !el.closest('.table-scroll, [role=region]'))
      .slice(0, 3)
      .map(
        (el) =>
          `${el.tagName.toLowerCase()}${el.id ? `#${el.id}` : ''}.${(el.getAttribute('class') ?? '').split(' ').slice(0, 3).join('.')}`,
      ),
  }));
  const file = info.outputPath(`${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  await info.attach(name, { path: file, contentType: 'image/png' });
  if (scrollWidth > innerWidth)
    problems.push(`${name} (${path}): ${scrollWidth} px wide on a ${innerWidth} px screen; sticking out: ${wide.join(', ')}`);
}

test('student pages fit a phone', async ({ page }, info) => {
  const problems: string[] = [];
  await signIn(page, 'student05@northmere.example');
  await fits(page, info, '/student', 'student-home', problems);
  await fits(page, info, await linkTo(page, /^\/student\/practicals\/\d+$/), 'student-practical', problems);
  // The submitted attempt's checks are on the page, in rows that reflow.
  await expect(page.locator('[data-attempt]').first()).toBeVisible();
  expect(problems).toEqual([]);
});

test('TA pages fit a phone', async ({ page }, info) => {
  const problems: string[] = [];
  await signIn(page, 'ta1@northmere.example');
  await fits(page, info, '/marking', 'marking-queue', problems);
  await expect(page.locator('tbody tr[data-submission]').first()).toBeVisible();
  const submission = await page.locator('tbody tr[data-submission]').first().getAttribute('data-submission');
  await fits(page, info, `/marking/${submission}`, 'marking-screen', problems);
  await expect(page.getByTestId('fit-plot').first()).toBeVisible();
  // A released submission's screen has the table of its e-mails too (released by the marking
  // test before this one; released here when this file runs on its own).
  const queued = await page.evaluate(async () => {
    const sent = await (await fetch('/api/marking/queue?status=released&pageSize=50')).json();
    const withMail = sent.rows.find((r: { delivery: string | null }) => r.delivery !== null);
    if (withMail) return { id: withMail.id as number, released: true };
    const queue = await (await fetch('/api/marking/queue?status=submitted&sort=submittedAt&dir=asc&pageSize=1')).json();
    return { id: queue.rows[0].id as number, released: false };
  });
  if (!queued.released) {
    expect(await markInBrowser(page, queued.id)).toBe('marked');
    const status = await page.evaluate(
      async (id) =>
        (
          await fetch('/api/release', {
            method: 'POST',
            headers: { 'Content-Type': 'application/json' },
            body: JSON.stringify({ submissionIds: [id] }),
          })
        ).status,
      queued.id,
    );
    expect(status).toBe(200);
  }
  const released = queued.id;
  await fits(page, info, `/marking/${released}`, 'marking-screen-released', problems);
  await expect(page.getByRole('region', { name: 'E-mails about this submission' })).toBeVisible();
  await fits(page, info, '/statistics', 'ta-statistics', problems);
  expect(problems).toEqual([]);
});

test('instructor pages fit a phone', async ({ page }, info) => {
  const problems: string[] = [];
  await signIn(page, 'instructor1@northmere.example');
  await fits(page, info, '/courses', 'courses', problems);
  const course = await linkTo(page, /^\/courses\/\d+$/);
  await fits(page, info, course, 'course-workspace', problems);
  await expect(page.getByRole('table', { name: 'People' })).toBeVisible();
  await fits(page, info, await linkTo(page, /^\/courses\/\d+\/practicals\/\d+$/), 'practical-editor', problems);
  await expect(page.getByRole('heading', { name: 'Tolerance bands' })).toBeVisible();
  await fits(page, info, '/moderation', 'moderation', problems);
  expect(problems).toEqual([]);
});

test('course lead pages fit a phone', async ({ page }, info) => {
  const problems: string[] = [];
  await signIn(page, 'lead@northmere.example');
  await fits(page, info, '/statistics', 'statistics-home', problems);
  await fits(page, info, await linkTo(page, /^\/statistics\/\d+$/), 'statistics-practical', problems);
  await expect(page.getByTestId('box-plots').first()).toBeVisible();
  // The box plots use the phone's width: each strip is at least 250 px wide (not squeezed to 60 px).
  const strip = await page.getByTestId('box-plots').first().locator('li > div[aria-hidden="true"]').first().boundingBox();
  expect(strip!.width).toBeGreaterThan(250);
  await fits(page, info, '/courses', 'lead-courses', problems);
  await fits(page, info, '/moderation', 'lead-moderation', problems);
  expect(problems).toEqual([]);
});

test('administrator pages and the error pages fit a phone', async ({ page }, info) => {
  const problems: string[] = [];
  await signIn(page, 'admin@northmere.example');
  await fits(page, info, '/admin', 'admin', problems);
  await fits(page, info, '/admin?q=student0', 'admin-search', problems);
  await fits(page, info, '/marking/999999999', 'not-found', problems);
  await expect(page.getByRole('heading', { name: 'Nothing here' })).toBeVisible();
  await fits(page, info, '/not-permitted', 'not-permitted', problems);
  expect(problems).toEqual([]);
});
