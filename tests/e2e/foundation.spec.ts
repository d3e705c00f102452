import { test, expect, type Page } from '@playwright/test';

// Demo accounts from the seeders (fictional Northmere University).
const PASSWORD = 'northmere-demo-26';

async function signIn(page: Page, email: string, password = PASSWORD) {
  await page.goto('/signin');
  await page.locator('#email').fill(email);
  await page.locator('#password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

const homes: [string, string, RegExp][] = [
  ['admin@northmere.example', '/admin', /Site administration/],
  ['lead@northmere.example', '/statistics', /Cohort statistics/],
  ['instructor1@northmere.example', '/courses', /Courses & practicals/],
  ['ta1@northmere.example', '/marking', /Marking/],
  ['student05@northmere.example', '/student', /My practicals/],
];

for (const [email, path, heading] of homes) {
  test(`${email} signs in through the form and lands on ${path}`, async ({ page }) => {
    await signIn(page, email);
    await expect(page).toHaveURL(new RegExp(`${path}$`));
    await expect(page.getByRole('heading', { level: 1, name: heading })).toBeVisible();
    await expect(page.getByTestId('signed-in-as')).toBeVisible();
  });
}

test('a wrong password shows a generic error and stays on sign-in', async ({ page }) => {
  await signIn(page, 'ta2@northmere.example', 'not-the-password');
  await expect(page.locator('form [role=alert]')).toHaveText('E-mail or password not recognised.');
  await expect(page).toHaveURL(/\/signin/);
  // An unknown account gets the very same words.
  await signIn(page, 'nobody@northmere.example', 'not-the-password');
  await expect(page.locator('form [role=alert]')).toHaveText('E-mail or password not recognised.');
});

test('a student opening a staff URL gets the not-permitted page', async ({ page }) => {
  await signIn(page, 'student06@northmere.example');
  await expect(page).toHaveURL(/\/student$/);
  await page.goto('/marking');
  await expect(page.getByRole('heading', { name: 'Not permitted' })).toBeVisible();
  await page.goto('/admin');
  await expect(page.getByRole('heading', { name: 'Not permitted' })).toBeVisible();
});

test('a signed-out visitor is sent to sign-in, and back to the page asked for after it', async ({ page }) => {
  await page.goto('/courses');
  await expect(page).toHaveURL(/\/signin\?next=%2Fcourses$/);
  await page.locator('#email').fill('instructor1@northmere.example');
  await page.locator('#password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page).toHaveURL(/\/courses$/);
  // Only a path on this site is followed: another host is ignored and the person lands on their home.
  await page.context().clearCookies();
  await page.goto('/signin?next=//elsewhere.example/x');
  await page.locator('#email').fill('ta2@northmere.example');
  await page.locator('#password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page).toHaveURL(/\/marking$/);
});

test('signing out returns to the sign-in page and closes the session', async ({ page }) => {
  await signIn(page, 'ta3@northmere.example');
  await expect(page).toHaveURL(/\/marking$/);
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/signin/);
  await page.goto('/marking');
  await expect(page).toHaveURL(/\/signin\?next=%2Fmarking$/);
});

test('the header links every page a role works in: a course lead reaches courses and moderation, a student only their own', async ({
  page,
}) => {
  await signIn(page, 'lead@northmere.example');
  const nav = page.getByRole('navigation', { name: 'Main' });
  await expect(nav.getByRole('link', { name: 'Cohort statistics' })).toHaveAttribute('aria-current', 'page');
  await nav.getByRole('link', { name: 'Moderation' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Moderation' })).toBeVisible();
  await nav.getByRole('link', { name: 'Courses & practicals' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Courses & practicals' })).toBeVisible();
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/signin/);
  await signIn(page, 'student05@northmere.example');
  await expect(page.getByRole('navigation', { name: 'Main' }).getByRole('link')).toHaveText(['My practicals']);
});
