import { test, expect, type Page } from '@playwright/test';
import { waitForMail } from '../helpers/maildev';

// Demo accounts from the seeders (fictional Northmere University).
const PASSWORD = 'northmere-demo-26';

async function signIn(page: Page, email: string, password = PASSWORD) {
  await page.goto('/signin');
  await page.locator('#email').fill(email);
  await page.locator('#password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

test('an instructor sets up a cohort, a roster and a practical with per-cohort bands; the invitation sets a password', async ({
  page,
  browser,
  baseURL,
}) => {
  test.setTimeout(120_000);
  const stamp = Date.now().toString(36);
  const cohort = `Group E2E ${stamp}`;
  const studentEmail = `e2e-${stamp}@northmere.example`;

  await signIn(page, 'instructor1@northmere.example');
  await expect(page).toHaveURL(/\/courses$/);
  await page
    .getByRole('link', { name: /CHEM2041/ })
    .first()
    .click();
  await expect(page.getByRole('heading', { level: 1, name: /CHEM2041/ })).toBeVisible();

  // A new cohort on the coarser bench.
  await page.getByLabel('Name', { exact: true }).fill(cohort);
  await page.getByLabel('Term', { exact: true }).fill('2027 Spring');
  await page.getByLabel('Instrument', { exact: true }).fill('FTIR bench 3 (2 cm⁻¹)');
  await page.getByRole('button', { name: 'Create cohort' }).click();
  await expect(page.getByText(`Cohort "${cohort}" created.`)).toBeVisible();
  await expect(page.getByRole('table', { name: 'Cohorts' }).getByRole('cell', { name: cohort, exact: true })).toBeVisible();

  // Roster with one bad row (a cohort that does not exist): preview, fix, import.
  const rows = (c2: string) =>
    `name,email,student_number,cohort\nMarta Ellison-Kray,${studentEmail},E2E${stamp}1,${cohort}\nJonah Pereira-Wolfe,e2e-b-${stamp}@northmere.example,E2E${stamp}2,${c2}\n`;
  await page.setInputFiles('#roster-file', { name: 'roster.csv', mimeType: 'text/csv', buffer: Buffer.from(rows('Group Nowhere')) });
  await page.getByRole('button', { name: 'Preview' }).click();
  const preview = page.getByRole('table', { name: 'Roster preview' });
  await expect(preview.getByText('No open cohort "Group Nowhere"', { exact: false })).toBeVisible();
  await expect(page.getByText('1 invalid row(s)')).toBeVisible();
  await expect(page.getByRole('button', { name: 'Import' })).toBeDisabled();
  await page.setInputFiles('#roster-file', { name: 'roster-fixed.csv', mimeType: 'text/csv', buffer: Buffer.from(rows(cohort)) });
  await page.getByRole('button', { name: 'Preview' }).click();
  await expect(page.getByText('Ready: 2 new, 0 already enrolled.')).toBeVisible();
  await page.getByRole('button', { name: 'Import' }).click();
  await expect(page.getByText(/Imported: 2 enrolled \(2 new accounts, 2 invitations sent\)/)).toBeVisible();

  // A practical for H35Cl with three quantities.
  await page.getByLabel('Title', { exact: true }).last().fill(`HCl band ${stamp}`);
  await page.getByLabel('Isotopologues').fill('H35Cl');
  await page.getByRole('button', { name: 'Create practical' }).click();
  await expect(page.getByRole('heading', { level: 1, name: `HCl band ${stamp}` })).toBeVisible();
  const addQuantity = async (label: string, marks: string) => {
    await page.locator('#q-key').selectOption({ label });
    await page.locator('#q-marks').fill(marks);
    await page.getByRole('button', { name: 'Add quantity' }).click();
    await expect(page.getByText(`${label} for H35Cl added.`)).toBeVisible();
  };
  await addQuantity('Band centre ν̃₀', '2');
  await addQuantity('Force constant k', '2');
  await addQuantity('Rotational constant B₀', '1');
  await expect(page.getByRole('table', { name: 'Quantities' }).getByRole('row')).toHaveCount(4);

  // Bands: a course default and a wider one for the new cohort.
  const band = async (scope: string, inner: string, outer: string) => {
    await page.locator('#b-quantity').selectOption({ label: 'Band centre ν̃₀ · H35Cl' });
    await page.locator('#b-scope').selectOption({ label: scope });
    await page.locator('#b-basis').selectOption('accuracy');
    await page.locator('#b-kind').selectOption('absolute');
    await page.locator('#b-inner').fill(inner);
    await page.locator('#b-outer').fill(outer);
    await page.getByRole('button', { name: 'Save band' }).click();
    await expect(page.getByText('✓ Band saved.')).toBeVisible();
  };
  await band('Course default (all cohorts)', '2', '5');
  await band(`Only ${cohort} (2027 Spring)`, '4', '8');
  // A header, the two bands set, and for each of the three quantities the consistency default that
  // applies without a band of the instructor's, in words (ν̃₀ and B₀ fitted, k arithmetic).
  await expect(page.getByRole('table', { name: 'Tolerance bands' }).getByRole('row')).toHaveCount(6);
  await expect(page.getByTestId('consistency-default')).toHaveCount(3);
  await expect(page.getByTestId('consistency-default').nth(0)).toContainText('Default — fitted: within 3 standard errors');
  await expect(page.getByTestId('consistency-default').nth(1)).toContainText('Default — arithmetic: to the digits the student typed');

  // Live preview: 2889.0 cm⁻¹ is 3.0 cm⁻¹ above the H³⁵Cl band origin 2885.98 cm⁻¹ (lib/grading reference table).
  await page.locator('#pv-quantity').selectOption({ label: 'Band centre ν̃₀ · H35Cl' });
  await page.locator('#pv-value').fill('2889.0');
  const verdicts = page.getByRole('table', { name: 'Preview verdicts' });
  await expect(verdicts.getByRole('row', { name: /accuracy/ })).toContainText('Partial credit');
  await expect(verdicts.getByRole('row', { name: /accuracy/ })).toContainText('0.5 / 1');
  await page.locator('#pv-cohort').selectOption({ label: `${cohort} (2027 Spring)` });
  await expect(verdicts.getByRole('row', { name: /accuracy/ })).toContainText('Within tolerance');
  await expect(verdicts.getByRole('row', { name: /accuracy/ })).toContainText('1 / 1');
  await expect(verdicts.getByRole('row', { name: /accuracy/ })).toContainText('this cohort');

  // The invitation reaches the catcher; its link sets a password, which then signs in.
  const [mail] = await waitForMail(studentEmail, 1, 30_000);
  expect(mail, 'invitation e-mail in the catcher').toBeTruthy();
  const link = /https?:\/\/\S+\/welcome\/[A-Za-z0-9_-]+/.exec(mail.text)![0];
  const path = new URL(link).pathname;
  const context = await browser.newContext({ baseURL });
  const fresh = await context.newPage();
  await fresh.goto(path);
  await expect(fresh.getByRole('heading', { name: 'Welcome to Oscillab' })).toBeVisible();
  await fresh.getByLabel('New password').fill('band-origin-2886');
  await fresh.getByLabel('The same password again').fill('band-origin-2886');
  await fresh.getByRole('button', { name: 'Set password' }).click();
  await expect(fresh.getByText('Your password is set.')).toBeVisible();
  await fresh.goto(path);
  await expect(fresh.getByText('This link has already been used.', { exact: false })).toBeVisible();
  await signIn(fresh, studentEmail, 'band-origin-2886');
  await expect(fresh).toHaveURL(/\/student$/);
  await context.close();
});

test('hazard notes are shown with the safety caution on the practical editor', async ({ page }) => {
  await signIn(page, 'instructor1@northmere.example');
  await page.getByRole('link', { name: 'HCl/DCl fundamental band' }).first().click();
  await expect(page.getByText('HCl and DCl are toxic and corrosive gases.')).toBeVisible();
  await expect(page.getByText('Local safety rules and the supervising staff take precedence over anything shown here.')).toBeVisible();
  await expect(page.locator('.katex').first()).toBeVisible();
});
