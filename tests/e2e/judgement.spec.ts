/**
 * A correct analysis of a long line list, with the centrifugal term in the student's fit but D not
 * reported, is consistent in every rotational constant; the TA's marking screen shows the model
 * the lines need and residuals with no arc. The lines are made from Huber & Herzberg constants of
 * H³⁵Cl (NIST WebBook, from memory; shared/reference-diatomics.md) with the published term
 * formulas, the bond length with CODATA 2018 constants (mathjs) and AME2020 masses
 * (chemical-elements) — tests/helpers/published-bands.ts, not the code under test.
 * student21 (CHEM2041 Group B) has no seeded submission; ta2 marks Group B.
 */
import { expect, test, type Page } from '@playwright/test';
import { PUBLISHED, Bv, bandOrigin, bondLengthAngstrom, fundamentalLines, speciesMassU, typed } from '../helpers/published-bands';

const PASSWORD = 'northmere-demo-26';
// eslint-disable-next-line @typescript-eslint/no-require-imports -- the demo cast is a CommonJS data file shared with the seeders
const CAST = require('../../seeders/data/demo-cast.cjs') as { FIRST_NAMES: string[]; LAST_NAMES: string[] };

async function signIn(page: Page, email: string) {
  await page.goto('/signin');
  await page.locator('#email').fill(email);
  await page.locator('#password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/signin'), { timeout: 30000 });
}

test('a correct long line list without D reported: every rotational constant within; the marking screen shows no arc', async ({
  page,
  browser,
}) => {
  test.setTimeout(120_000);
  const k = PUBLISHED.H35Cl;
  const mu = speciesMassU(k);
  const lines = fundamentalLines(k, 10, 10);
  const pasted = ['Branch\tJ\tWavenumber / cm-1', ...lines.map((l) => `${l.branch}\t${l.J}\t${l.wavenumber.toFixed(4)}`)].join('\n');

  await signIn(page, 'student21@northmere.example');
  await page.goto('/student');
  await page.getByRole('link', { name: 'HCl/DCl fundamental band' }).click();
  await page
    .getByLabel(/Line list for H/)
    .first()
    .fill(pasted);
  await expect(page.getByText(/21 lines read/)).toBeVisible();

  const h = 'H35Cl';
  const fill = async (key: string, value: string, unit: string, unc?: string) => {
    await page.locator(`#q-${h}-${key}-value`).fill(value);
    await page.locator(`#q-${h}-${key}-unit`).fill(unit);
    if (unc !== undefined && (await page.locator(`#q-${h}-${key}-unc`).count())) await page.locator(`#q-${h}-${key}-unc`).fill(unc);
  };
  await fill('bandCentre', typed(bandOrigin(k), 7), 'cm-1', '0.001');
  await fill('B0', typed(Bv(k, 0), 6), 'cm-1', '0.0001');
  await fill('B1', typed(Bv(k, 1), 6), 'cm-1', '0.0001');
  await fill('Be', typed(k.Be, 6), 'cm-1', '0.0001');
  await fill('alphaE', typed(k.alphaE, 5), 'cm-1', '0.0001');
  await fill('re', typed(bondLengthAngstrom(k.Be, mu), 6), 'Å', '0.00001');

  await page.getByRole('button', { name: 'Submit…' }).click();
  await page.getByRole('dialog').getByRole('button', { name: 'Submit this attempt' }).click();
  await expect(page.getByRole('heading', { name: 'Result of your submission' })).toBeVisible({ timeout: 30000 });
  for (const label of [
    'Rotational constant B₀',
    'Rotational constant B₁',
    'Equilibrium rotational constant Bₑ',
    'Vibration–rotation constant αₑ',
    'Equilibrium bond length rₑ',
  ]) {
    const row = page.locator('tr', { has: page.getByText(label, { exact: false }) }).first();
    await expect(row.locator('td').nth(2), label).toContainText('within tolerance');
  }
  await expect(page.getByTestId('student-fit').first()).toContainText('with the centrifugal term');

  // The TA's screen: the model the lines need, no systematic residuals, and residuals at the rounding of the pasted positions.
  const ta = await browser.newPage();
  await signIn(ta, 'ta2@northmere.example');
  await ta.goto('/marking');
  // student21's name as the demo cast builds it (seeders/data/demo-cast.cjs: student i gets FIRST_NAMES[i % n], LAST_NAMES[7i % m]).
  const i = 20;
  const name = `${CAST.FIRST_NAMES[i % CAST.FIRST_NAMES.length]} ${CAST.LAST_NAMES[(i * 7) % CAST.LAST_NAMES.length]}`;
  const row = ta.locator('tbody tr[data-submission]').filter({ hasText: name }).first();
  await expect(row).toBeVisible();
  await ta.goto(`/marking/${await row.getAttribute('data-submission')}`);
  const description = ta.getByTestId('fit-description').first();
  await expect(description).toContainText('with the centrifugal term −4Dm³');
  // "rms residual 2.6 × 10⁻⁵ cm⁻¹": the positions were pasted to 4 decimals, so about 3 × 10⁻⁵ is rounding.
  const m = /rms residual ([\d.]+)(?: × 10([⁻⁰¹²³⁴⁵⁶⁷⁸⁹]+))? cm⁻¹/.exec((await description.textContent()) ?? '');
  expect(m).not.toBeNull();
  const exponent = m![2] ? -Number([...m![2].slice(1)].map((d) => '⁰¹²³⁴⁵⁶⁷⁸⁹'.indexOf(d)).join('')) : 0;
  expect(Number(m![1]) * 10 ** exponent).toBeLessThan(1e-3);
  await expect(ta.locator('[data-notice="systematic-residuals"]')).toHaveCount(0);
  await ta.close();
});
