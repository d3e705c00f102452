/**
 * A student with no seeded submission (student01, CHEM2041 Group A) pastes a 30-line list from a
 * spreadsheet, uploads a JCAMP-DX spectrum and a PDF, enters μ and k with units, submits a
 * deliberately wrong k (the factor 4π² left out: k = c²ν̃²μ),
 * and in practice mode sees the named slip; the plot shows their lines.
 * Expected k from k = 4π²c²ν̃²μ with CODATA 2018 c and u, AME2020 masses.
 */
import fs from 'node:fs';
import path from 'node:path';
import { expect, test } from '@playwright/test';

const SPECTRA = path.resolve(__dirname, '../fixtures/spectra');
const C_CM = 2.99792458e10; // CODATA 2018, cm s⁻¹
const U = 1.6605390666e-27; // CODATA 2018, kg
const MU_U = (1.00782503223 * 34.968852682) / (1.00782503223 + 34.968852682); // AME2020

function thirtyLines(): string {
  // H³⁵Cl and H³⁷Cl lines of the generated spectrum (published constants; fixtures/spectra/README.md), tab-separated like a spreadsheet copy.
  const rows: string[] = [];
  for (const f of ['hcl-298k.H35Cl.lines.csv', 'hcl-298k.H37Cl.lines.csv']) {
    const lines = fs.readFileSync(path.join(SPECTRA, f), 'utf8').trim().split('\n').slice(1);
    for (const l of lines) rows.push(l.split(',').join('\t'));
  }
  return ['Branch\tJ\tWavenumber / cm-1', ...rows.slice(0, 30)].join('\n');
}

test('student pastes a line list, uploads files, submits and sees a named slip', async ({ page }) => {
  await page.goto('/signin');
  await page.fill('#email', 'student01@northmere.example');
  await page.fill('#password', 'northmere-demo-26');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/signin'), { timeout: 30000 });
  await page.goto('/student');
  await page.getByRole('link', { name: 'HCl/DCl fundamental band' }).click();
  await expect(page.getByText(/take precedence/)).toBeVisible();

  const text = thirtyLines();
  await page
    .getByLabel(/Line list for H/)
    .first()
    .fill(text);
  await expect(page.getByText(/30 lines read/)).toBeVisible();

  const nu0 = 2886.0;
  const kRight = 4 * Math.PI ** 2 * C_CM ** 2 * nu0 ** 2 * MU_U * U; // ≈ 481 N m⁻¹
  const kWrong = kRight / (4 * Math.PI ** 2); // the slip: 2π missing
  const h = 'H35Cl';
  await page.locator(`#q-${h}-bandCentre-value`).fill('2886.0');
  await page.locator(`#q-${h}-bandCentre-unit`).fill('cm-1');
  await page.locator(`#q-${h}-bandCentre-unc`).fill('0.5');
  await page.locator(`#q-${h}-reducedMass-value`).fill(MU_U.toFixed(5));
  await page.locator(`#q-${h}-reducedMass-unit`).fill('u');
  await page.locator(`#q-${h}-forceConstant-value`).fill(kWrong.toFixed(1));
  await page.locator(`#q-${h}-forceConstant-unit`).fill('N/m');
  await page.locator(`#q-${h}-forceConstant-unc`).fill('0.3');

  await page.setInputFiles('#spectrum-file', path.join(SPECTRA, 'hcl-298k.jdx'));
  await expect(page.getByText(/Uploaded hcl-298k\.jdx/)).toBeVisible({ timeout: 20000 });
  const pdf = Buffer.from(
    '%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[3 0 R]/Count 1>>endobj\n3 0 obj<</Type/Page/Parent 2 0 R/MediaBox[0 0 612 792]>>endobj\ntrailer<</Root 1 0 R>>\n%%EOF\n',
  );
  await page.setInputFiles('#report-file', { name: 'report.pdf', mimeType: 'application/pdf', buffer: pdf });
  await expect(page.getByText(/Uploaded report\.pdf/)).toBeVisible({ timeout: 20000 });

  // The plot draws the student's lines over their spectrum.
  const plot = page.getByTestId('spectrum-plot');
  await expect(plot.locator('svg')).toBeVisible({ timeout: 20000 });
  await expect(page.getByText(/of your lines match a peak/)).toBeVisible();

  // Submit asks first (what is handed in, attempts left after it); a double click on the
  // confirmation still makes one attempt.
  await page.getByRole('button', { name: 'Submit…' }).click();
  const dialog = page.getByRole('dialog');
  await expect(dialog).toContainText(/afterwards you have \d+ attempts? left/);
  await expect(dialog).toContainText('hcl-298k.jdx');
  await dialog.getByRole('button', { name: 'Submit this attempt' }).dblclick();
  await expect(page.getByRole('heading', { name: 'Result of your submission' })).toBeVisible({ timeout: 30000 });
  await expect(page.locator('[data-slip="missing-2pi"]').first()).toBeVisible();
  await expect(page.getByText('Factor 2π missing').first()).toBeVisible();
  // The list of attempts below is up to date without a reload: the new attempt is the marked one.
  const list = page.locator('section[aria-labelledby="attempts"]');
  await expect(list.locator('[data-attempt="1"] [data-testid="marked-attempt"]')).toBeVisible();
  await expect(list.locator('[data-attempt]')).toHaveCount(1);
});
