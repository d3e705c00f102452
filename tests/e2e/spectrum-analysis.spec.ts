/**
 * A student (student21, CHEM2041 Group B, no seeded submission) uploads one spectrum holding two
 * bands — the HCl and DCl fundamentals of one cell — takes the lines from it into the form, and
 * the match summary names each band. The spectrum is synthetic, made by the project's generator
 * from the Huber & Herzberg constants (NIST WebBook, from memory; shared reference table)
 * through the published term formulas (tests/helpers/diatomic-lines.ts).
 */
import { expect, test } from '@playwright/test';
import { toJcampDx } from '../../lib/spectrum/jcamp-write';
import { bandLines, record } from '../helpers/diatomic-lines';

function twoBandFile(): Buffer {
  const lines = [...bandLines('H35Cl', 1), ...bandLines('H37Cl', 1), ...bandLines('D35Cl', 1), ...bandLines('D37Cl', 1)];
  const spectrum = record({
    lines,
    from: 1850,
    to: 3200,
    step: 0.25,
    resolution: 0.5,
    noise: 5e-4,
    seed: 21,
    baselineSlope: 1e-5,
    yKind: 'transmittance',
  });
  return Buffer.from(
    toJcampDx(spectrum, { title: 'SYNTHETIC HCl + DCl cell (test)', notes: ['SYNTHETIC test spectrum, not a measurement.'] }),
  );
}

test('a student uploads a two-band spectrum, takes the lines from it, and the match summary names each band', async ({ page }) => {
  await page.goto('/signin');
  await page.fill('#email', 'student21@northmere.example');
  await page.fill('#password', 'northmere-demo-26');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/signin'), { timeout: 30000 });
  await page.goto('/student');
  await page.getByRole('link', { name: 'HCl/DCl fundamental band' }).click();

  await page.setInputFiles('#spectrum-file', { name: 'hcl-dcl-cell.jdx', mimeType: 'chemical/x-jcamp-dx', buffer: twoBandFile() });
  await expect(page.getByText(/Uploaded hcl-dcl-cell\.jdx/)).toBeVisible({ timeout: 30000 });
  // What Oscillab found, band by band.
  const found = page.getByTestId('bands-found');
  await expect(found.getByText(/^H³⁵Cl fundamental \(1←0\): \d+ lines found and assigned\.$/)).toBeVisible({ timeout: 30000 });
  await expect(found.getByText(/^D³⁵Cl fundamental \(1←0\): \d+ lines found and assigned\.$/)).toBeVisible();

  await page.getByRole('button', { name: 'Take the lines from my spectrum' }).click();
  const taken = page.getByTestId('taken-lines');
  await expect(taken.getByText(/^H³⁵Cl: \d+ lines of the fundamental \(1←0\), P\(1\)–P\(\d+\), R\(0\)–R\(\d+\)$/)).toBeVisible({
    timeout: 30000,
  });
  await expect(taken.getByText(/^D³⁵Cl: \d+ lines of the fundamental \(1←0\)/)).toBeVisible();
  await page.getByRole('button', { name: 'Use these lines' }).click();

  // The line lists are filled, every line assigned, ready to check and edit.
  for (const sp of ['H35Cl', 'D35Cl']) {
    const list = page.locator(`#lines-${sp}`);
    await expect(list).toHaveValue(/^branch,J,wavenumber \(cm-1\)\n/);
    const status = page.locator(`#lines-${sp}-status`);
    await expect(status).toHaveText(/(\d+) lines read, \1 assigned\./);
  }

  // The match summary counts the student's lines per isotopologue and band, naming each band.
  const summary = page.getByTestId('match-summary');
  await expect(summary.getByText(/H³⁵Cl fundamental \(1←0\): (\d+) of \1 of your lines match a peak of your spectrum/)).toBeVisible({
    timeout: 30000,
  });
  await expect(summary.getByText(/D³⁵Cl fundamental \(1←0\): (\d+) of \1 of your lines match a peak of your spectrum/)).toBeVisible();
});
