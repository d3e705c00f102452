/**
 * The course lead opens the statistics of a seeded cohort (demo seed: CHEM2041 Group A), sees the
 * charts and the slip table, and downloads the marks CSV with its documented header.
 */
import { expect, test } from '@playwright/test';
import fs from 'node:fs';
import { markInBrowser } from './mark-in-browser';

test('course lead sees cohort statistics and downloads the marks CSV', async ({ page }) => {
  await page.goto('/signin');
  await page.fill('#email', 'lead@northmere.example');
  await page.fill('#password', 'northmere-demo-26');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/signin'));

  await page.goto('/statistics');
  await expect(page.getByRole('heading', { level: 1, name: 'Cohort statistics' })).toBeVisible();
  await page
    .getByRole('link', { name: /Group A/ })
    .first()
    .click();
  await expect(page.getByRole('heading', { level: 1, name: /Statistics:/ })).toBeVisible();
  await expect(page.getByRole('heading', { name: /Submissions — Group A/ })).toBeVisible();

  // Charts (drawn on the server in HTML) with accessible names, and the slip table.
  await expect(page.getByRole('figure', { name: /Box plots of relative deviation, consistency/ })).toBeVisible();
  await expect(page.getByRole('img', { name: /Histogram of relative deviation/ }).first()).toBeVisible();
  await expect(page.getByTestId('histogram').first()).toBeVisible();
  await expect(page.getByRole('heading', { name: 'Most frequent slips' })).toBeVisible();
  const slipRows = page.getByRole('table', { name: /Most frequent named slips/ }).locator('tbody tr');
  await expect(slipRows.first()).toBeVisible();
  // Each slip names its quantities (not code keys) and an example student and attempt.
  await expect(slipRows.first().getByRole('link', { name: /^.+, attempt \d+$/ })).toHaveAttribute('href', /^\/marking\/\d+$/);
  const found = await slipRows.locator('td[data-label="Found in"]').allInnerTexts();
  expect(found.length).toBeGreaterThan(0);
  for (const cell of found) {
    expect(cell).not.toMatch(/\b(forceConstant|reducedMass|bandCentre|alphaE|B0|B1|Be|re|r0)\b/);
    expect(cell).toMatch(
      /Force constant|Reduced mass|Band centre|Rotational constant|Vibration–rotation|bond length|Isotope|Harmonic|Anharmonicity|Dissociation|Zero-point|Centrifugal/,
    );
  }
  // Deviations read as people write them: no e-notation anywhere in the figures.
  expect(await page.locator('main').innerText()).not.toMatch(/\d(\.\d+)?e[-+]?\d/);

  const download = page.waitForEvent('download');
  await page.getByRole('link', { name: /Marks CSV/ }).click();
  const file = await (await download).path();
  const text = fs.readFileSync(file!, 'utf8').replace(/^\ufeff/, '');
  expect(text.split(/\r?\n/)[0]).toMatch(
    /^student_number,name,email,cohort,practical,attempt,submitted_at,late_days,late_penalty_percent,.*total,max_total,status$/,
  );
  expect(text.split(/\r?\n/).filter(Boolean).length).toBe(21); // header + the 20 students of Group A
});

/**
 * The kept statistics follow a mark and a release made through the running server. The server
 * loads the database module in several bundles; a statistics update queued by one copy must still
 * run when another copy's transaction commits (it did not: marks left the kept counts behind).
 */
test('a mark and a release through the server move the kept counts at once', async ({ browser }) => {
  const as = async (email: string) => {
    const page = await (await browser.newContext()).newPage();
    await page.goto('/signin');
    await page.fill('#email', email);
    await page.fill('#password', 'northmere-demo-26');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((url) => !url.pathname.startsWith('/signin'));
    return page;
  };
  const lead = await as('lead@northmere.example');
  await lead.goto('/statistics');
  const href = (await lead
    .getByRole('link', { name: /Group B/ })
    .first()
    .getAttribute('href'))!;
  const [, practicalId, cohortId] = href.match(/\/statistics\/(\d+)\?cohortId=(\d+)/)!;
  const counts = async () =>
    (await (await lead.request.get(`/api/statistics/practicals/${practicalId}?cohortId=${cohortId}`)).json()).counts as {
      marked: number;
      released: number;
    };
  const before = await counts();

  // ta2 marks Group B: the oldest submitted attempt (a seeded one), accepted and completed, then released.
  const ta = await as('ta2@northmere.example');
  await ta.goto('/marking');
  const id = await ta.evaluate(
    async ({ practicalId, cohortId }) =>
      (
        await (
          await fetch(
            `/api/marking/queue?practicalId=${practicalId}&cohortId=${cohortId}&status=submitted&sort=submittedAt&dir=asc&pageSize=1`,
          )
        ).json()
      ).rows[0].id as number,
    { practicalId, cohortId },
  );
  const outcome = { id, status: await markInBrowser(ta, id) };
  expect(outcome.status).toBe('marked');
  const marked = await counts();
  expect(marked.marked).toBe(before.marked + 1);

  const released = await ta.evaluate(async (id) => {
    const res = await fetch('/api/release', {
      method: 'POST',
      headers: { 'Content-Type': 'application/json' },
      body: JSON.stringify({ submissionIds: [id] }),
    });
    return (await res.json()).released as number;
  }, outcome.id);
  expect(released).toBe(1);
  expect((await counts()).released).toBe(before.released + 1);
});
