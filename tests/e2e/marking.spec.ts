/**
 * A TA's week, in the browser, against the seeded demo data (CHEM2041 Group A, marked by
 * ta1): filter to out-of-tolerance, override one mark with a comment, release five, and the
 * five e-mails with PDFs arrive in the mail catcher (MAILDEV_API); the PDF's text carries the
 * student's values and the named slip; the student downloads the same PDF.
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';

const PASSWORD = 'northmere-demo-26';
const api = () => process.env.MAILDEV_API || 'http://127.0.0.1:1080';

async function signIn(page: Page, email: string) {
  await page.goto('/signin');
  await page.locator('#email').fill(email);
  await page.locator('#password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/signin'));
}

function pdfText(bytes: Buffer): string {
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'e2e-pdf-')), 'f.pdf');
  fs.writeFileSync(file, bytes);
  return execFileSync('pdftotext', ['-enc', 'UTF-8', file, '-']).toString('utf8');
}

test('a TA marks with an override, releases five, and the feedback arrives', async ({ page, browser }) => {
  test.setTimeout(180_000);
  await fetch(`${api()}/api/email/all`, { method: 'DELETE' }).catch(() => undefined);
  await signIn(page, 'ta1@northmere.example');
  await page.goto('/marking');
  // A "named slip" flag says which slip.
  await page.getByLabel('Flag').selectOption('slip');
  await expect(page.locator('tbody tr[data-submission] [data-flag="slip"]').first()).toContainText(/Named slip: \S+/);
  await page.getByLabel('Flag').selectOption('outside');
  await page.getByLabel('Status').selectOption('submitted');
  const firstRow = page.locator('tbody tr[data-submission]').first();
  await expect(firstRow).toBeVisible();
  await expect(page.locator('tbody tr[data-submission]').filter({ hasNot: page.getByText('Outside tolerance') })).toHaveCount(0);

  // Open with the keyboard and override one proposed mark with a comment.
  await page.locator('body').click();
  await page.keyboard.press('Enter');
  await page.waitForURL(/\/marking\/\d+$/);
  const markedId = Number(page.url().split('/').pop());
  const row = page.locator('tr[data-item]').filter({ hasText: 'Force constant' }).first();
  const input = row.locator('input[type=number]');
  const proposed = Number(await input.inputValue());
  const max = Number(await input.getAttribute('max'));
  await input.fill(String(proposed >= max ? max - 0.5 : proposed + 0.5));
  await page.getByRole('button', { name: 'Save marks' }).click();
  await expect(page.getByTestId('marking-problem')).toContainText(/comment/i);
  await row.locator('textarea').fill('The method is right; half a mark back for the working shown.');
  for (const hand of await page.locator('tr[data-item^="rubric:"] input[type=number]').all())
    if (!(await hand.inputValue())) await hand.fill('1');
  await page.getByRole('button', { name: 'Save marks' }).click();
  await expect(page.getByTestId('marking-status')).toContainText(/Saved/);
  // The total reads as one sum, and the next submission is one click away.
  await expect(page.getByTestId('marking-total')).toContainText(/Total [\d.]+ of \d+|− late penalty/);
  await expect(page.getByTestId('next-after-save')).toHaveAttribute('href', /^\/marking\/\d+$/);

  // Four more from the queue: the proposal stands for every quantity, the hand-marked items get a mark.
  for (let i = 0; i < 4; i++) {
    await page.goto('/marking');
    await page.getByLabel('Status').selectOption('submitted');
    const next = page.locator('tbody tr[data-submission]').first();
    await expect(next).toBeVisible();
    await page.goto(`/marking/${await next.getAttribute('data-submission')}`);
    for (const hand of await page.locator('tr[data-item^="rubric:"] input[type=number]').all())
      if (!(await hand.inputValue())) await hand.fill('1');
    await page.getByRole('button', { name: 'Save marks' }).click();
    await expect(page.getByTestId('marking-status')).toContainText(/Saved: marked/);
  }
  await page.goto('/marking');
  await page.getByLabel('Status').selectOption('marked');
  await expect(page.locator('tbody tr[data-submission]').first()).toBeVisible();
  const markedRows = page.locator('tbody tr[data-submission]');
  const ids: number[] = [];
  for (let i = 0; i < Math.min(5, await markedRows.count()); i++) {
    await markedRows.nth(i).locator('input[type=checkbox]').check();
    ids.push(Number(await markedRows.nth(i).getAttribute('data-submission')));
  }
  expect(ids).toContain(markedId);
  expect(ids).toHaveLength(5);
  // Release asks first, naming who gets what; it cannot be undone.
  await page.getByRole('button', { name: /Release selected/ }).click();
  const dialog = page.getByRole('dialog');
  await expect(dialog).toContainText('cannot be withdrawn');
  await expect(dialog.getByTestId('release-list').locator('li')).toHaveCount(5);
  await expect(dialog.getByTestId('release-list')).toContainText('@northmere.example');
  await dialog.getByRole('button', { name: 'Release 5 now' }).click();
  await expect(page.getByTestId('queue-message')).toContainText('Released 5 of 5');

  // Five e-mails, each with a PDF attachment.
  let mails: {
    id: string;
    to: { address: string }[];
    attachments?: { generatedFileName: string; contentType: string }[];
    subject: string;
  }[] = [];
  await expect
    .poll(
      async () => {
        mails = ((await (await fetch(`${api()}/api/email`)).json()) as typeof mails).filter((m) =>
          m.subject.startsWith('Feedback released'),
        );
        return mails.length;
      },
      { timeout: 30_000 },
    )
    .toBe(5);
  for (const m of mails) expect(m.attachments?.[0]?.contentType).toBe('application/pdf');

  // The overridden submission's PDF: the student's values and the named slip.
  const view = await (await page.request.get(`/api/marking/${markedId}`)).json();
  const studentEmail: string = view.student.email;
  const typed: string =
    view.quantities.find((q: { key: string }) => q.key === 'forceConstant')?.reportedTyped ?? view.quantities[0].reportedTyped;
  const mail = mails.find((m) => m.to.some((t) => t.address.toLowerCase() === studentEmail.toLowerCase()))!;
  expect(mail).toBeTruthy();
  // The e-mail links to the released attempt on the practical's page, not to the student home.
  const full = (await (await fetch(`${api()}/api/email/${mail.id}`)).json()) as { text: string };
  expect(full.text).toMatch(new RegExp(`/student/practicals/\\d+#attempt-${markedId}`));
  const fromMail = Buffer.from(
    await (await fetch(`${api()}/api/email/${mail.id}/attachment/${mail.attachments![0].generatedFileName}`)).arrayBuffer(),
  );
  const text = pdfText(fromMail);
  expect(text).toContain(typed.split(' ')[0]);
  if (view.slips.length) expect(text).toContain(view.slips[0].title);

  // The student downloads the same PDF (route served by the student area).
  const ctx = await browser.newContext();
  const student = await ctx.newPage();
  await signIn(student, studentEmail);
  const res = await student.request.get(`/api/submissions/${markedId}/feedback`);
  expect(res.status()).toBe(200);
  expect(Buffer.from(await res.body()).equals(fromMail)).toBe(true);
  // Their home says the feedback is out, with the mark.
  await student.goto('/student');
  await expect(student.getByText(/Feedback released: [\d.]+ of \d+/).first()).toBeVisible();
  await ctx.close();
});
