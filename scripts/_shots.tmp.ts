import { chromium } from '@playwright/test';
import { toJcampDx } from '@/lib/spectrum/jcamp-write';
import { bandLines, record } from '@/tests/helpers/diatomic-lines';
const BASE = 'http://localhost:3650';
const lines = [...bandLines('H35Cl', 1), ...bandLines('H37Cl', 1), ...bandLines('D35Cl', 1), ...bandLines('D37Cl', 1)];
const spec = record({ lines, from: 1850, to: 3200, step: 0.25, resolution: 0.5, noise: 5e-4, seed: 21, baselineSlope: 1e-5, yKind: 'transmittance' });
const file = Buffer.from(toJcampDx(spec, { title: 'SYNTHETIC HCl + DCl cell', notes: ['SYNTHETIC'] }));
async function login(page: any, email: string) {
  await page.goto(`${BASE}/signin`);
  await page.fill('#email', email);
  await page.fill('#password', 'northmere-demo-26');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u: URL) => !u.pathname.startsWith('/signin'), { timeout: 30000 });
}
(async () => {
  const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking'] });
  for (const [w, h, tag] of [[1440, 900, 'wide'], [390, 844, 'phone']] as const) {
    const ctx = await browser.newContext({ viewport: { width: w, height: h } });
    const page = await ctx.newPage();
    await login(page, tag === 'wide' ? 'student21@northmere.example' : 'student01@northmere.example');
    await page.goto(`${BASE}/student`);
    await page.getByRole('link', { name: 'HCl/DCl fundamental band' }).click();
    await page.setInputFiles('#spectrum-file', { name: 'hcl-dcl-cell.jdx', mimeType: 'chemical/x-jcamp-dx', buffer: file });
    await page.getByTestId('bands-found').waitFor({ timeout: 30000 });
    await page.getByRole('button', { name: 'Take the lines from my spectrum' }).click();
    await page.getByTestId('taken-lines').waitFor();
    await page.getByTestId('spectrum-panel').screenshot({ path: `/tmp/spec-shots/student-taken-${tag}.png` });
    await page.getByRole('button', { name: 'Use these lines' }).click();
    await page.getByTestId('match-summary').waitFor({ timeout: 30000 });
    await page.waitForTimeout(500);
    await page.getByTestId('spectrum-panel').screenshot({ path: `/tmp/spec-shots/student-summary-${tag}.png` });
    await page.screenshot({ path: `/tmp/spec-shots/student-page-${tag}.png`, fullPage: false });
    await ctx.close();
  }
  // Marking screen of a demo submission with a spectrum (submission 1 has one), as ta1.
  for (const [w, h, tag] of [[1440, 900, 'wide'], [390, 844, 'phone']] as const) {
    const ctx = await browser.newContext({ viewport: { width: w, height: h } });
    const page = await ctx.newPage();
    await login(page, 'ta1@northmere.example');
    await page.goto(`${BASE}/marking/1`);
    await page.getByTestId('spectrum-analysis').waitFor({ timeout: 30000 });
    await page.getByTestId('spectrum-analysis').screenshot({ path: `/tmp/spec-shots/marking-analysis-${tag}.png` });
    if (tag === 'wide') {
      const pdf = await page.request.get(`${BASE}/api/marking/1/preview`);
      require('fs').writeFileSync('/tmp/spec-shots/feedback.pdf', await pdf.body());
    }
    await ctx.close();
  }
  // Instructor settings.
  for (const [w, h, tag] of [[1440, 900, 'wide'], [390, 844, 'phone']] as const) {
    const ctx = await browser.newContext({ viewport: { width: w, height: h } });
    const page = await ctx.newPage();
    await login(page, 'instructor1@northmere.example');
    await page.goto(`${BASE}/courses`);
    const res = await page.request.get(`${BASE}/api/courses`);
    const courses = await res.json();
    const chem = (courses.courses ?? courses).find((c: any) => c.code === 'CHEM2041');
    await page.goto(`${BASE}/courses/${chem.id}/practicals/1`);
    await page.getByRole('heading', { name: 'Spectra' }).waitFor({ timeout: 30000 });
    await page.getByRole('radio', { name: 'One spectrum per sample' }).check();
    const sec = page.locator('section', { has: page.getByRole('heading', { name: 'Spectra' }) });
    await sec.screenshot({ path: `/tmp/spec-shots/instructor-settings-${tag}.png` });
    await ctx.close();
  }
  await browser.close();
})().catch((e) => { console.error(e); process.exit(1); });
