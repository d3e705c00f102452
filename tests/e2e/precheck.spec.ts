/**
 * A student's format problems are shown before an attempt is spent (issue: B₀ typed in "cm").
 * student03 (CHEM2041 Group A) types a rotational constant with a length unit: the form says so
 * as they type; "Check without submitting" lists it with the other format checks; Submit asks
 * first, and saying "Not yet" leaves the attempts as they were. Unit dimensions from
 * lib/grading/units.ts (common practice: rotational constants in cm⁻¹).
 */
import { expect, test } from '@playwright/test';

test('a unit typo is shown before Submit, and no attempt is used', async ({ page }) => {
  await page.goto('/signin');
  await page.fill('#email', 'student03@northmere.example');
  await page.fill('#password', 'northmere-demo-26');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/signin'));
  await page.getByRole('link', { name: 'HCl/DCl fundamental band' }).first().click();
  await expect(page.getByRole('heading', { name: 'Your submission' })).toBeVisible();

  const attemptsBefore = await page.locator('[data-attempt]').count();
  const leftBefore = (await page.getByTestId('attempts-left').innerText()).trim();

  // As they type: the unit of length is named under the box, tied to it for screen readers.
  await page.locator('#q-H35Cl-B0-value').fill('10.44');
  await page.locator('#q-H35Cl-B0-unit').fill('cm');
  const live = page.locator('[data-quantity="H35Cl:B0"] [data-testid="live-check"]');
  await expect(live).toContainText('"cm" is a unit of length, but this quantity is a wavenumber');
  await expect(page.locator('#q-H35Cl-B0-unit')).toHaveAttribute('aria-invalid', 'true');
  await expect(page.locator('#q-H35Cl-B0-unit')).toHaveAttribute('aria-describedby', 'q-H35Cl-B0-unit-check');

  // The full check, on the server, costs nothing.
  await page.getByRole('button', { name: 'Check without submitting' }).click();
  const panel = page.getByTestId('precheck');
  await expect(panel).toContainText('nothing submitted, no attempt used');
  await expect(panel).toContainText('"cm" is a unit of length');
  await expect(panel).toContainText('was not reported');
  await expect(page.getByTestId('attempts-left')).toHaveText(leftBefore);

  // Submit asks first and says what would be handed in; "Not yet" hands in nothing.
  await page.getByRole('button', { name: 'Submit…' }).click();
  const dialog = page.getByRole('dialog');
  await expect(dialog).toContainText(/afterwards you have \d+ attempts? left/);
  await expect(dialog).toContainText('format problem');
  await expect(dialog).toContainText('Not reported');
  await dialog.getByRole('button', { name: 'Not yet' }).click();
  await expect(dialog).toBeHidden();

  // Fixing the unit clears the message at once.
  await page.locator('#q-H35Cl-B0-unit').fill('cm-1');
  await expect(live).not.toContainText('unit of length');

  // After a reload: the same attempts, the same number left.
  await page.waitForTimeout(1800); // let the autosave of the draft settle
  await page.reload();
  await expect(page.locator('[data-attempt]')).toHaveCount(attemptsBefore);
  await expect(page.getByTestId('attempts-left')).toHaveText(leftBefore);
  // The draft kept what was typed (autosave), unit fixed.
  await expect(page.locator('#q-H35Cl-B0-unit')).toHaveValue('cm-1');
});
