/**
 * Security and robustness, round two (issue 14), item 7: inputs that used to answer 500. A formula
 * nested 3,000 braces deep in practical instructions, NUL bytes in text fields, CR/LF in a course
 * title (which cut e-mail subjects). Refused at the edge with a 400 that says why; text stored
 * before the bounds existed renders as a readable notice, never a 500.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { apiRequest, params } from '../helpers/session';
import { buildWorld, type World } from '../helpers/world';
import { buildPractical } from '@/tests/fixtures/submissions/practical';
import { POST as createCourse } from '@/app/api/courses/route';
import { PATCH as updateCourse } from '@/app/api/courses/[courseId]/route';
import { POST as createCohort } from '@/app/api/courses/[courseId]/cohorts/route';
import { GET as getPractical, PUT as putPractical } from '@/app/api/practicals/[practicalId]/route';
import { POST as markdownPreview } from '@/app/api/practicals/markdown/route';
import { renderInstructions } from '@/lib/instructor/markdown';
import { renderEmail } from '@/lib/templates';
import { queueEmail } from '@/lib/mail/outbox';
import { models } from '@/models';

/** 3,000 nested braces inside one inline formula. */
export const NESTED_FORMULA = `Record the band: $${'{'.repeat(3000)}x${'}'.repeat(3000)}$.`;
/** The same depth problem in a short formula (under the length bound). */
const DEEP_SHORT = `$${'{'.repeat(100)}x${'}'.repeat(100)}$`;

let world: World;
let practicalId: number;
beforeAll(async () => {
  world = await buildWorld();
  practicalId = (await buildPractical(world)).practical.id;
});

const practicalBody = (over: Record<string, unknown>) => ({
  title: 'Nested formula practical',
  species: ['H35Cl'],
  instructions: 'Record the band.',
  hazardNotes: '',
  mode: 'practice',
  maxAttempts: 3,
  lateRule: 'penalty',
  latePenaltyPerDay: 10,
  latePenaltyCap: 50,
  rubric: [],
  deadlines: [],
  ...over,
});
const put = async (body: unknown) =>
  putPractical(
    await apiRequest(`/api/practicals/${practicalId}`, { as: world.people.instructor.id, method: 'PUT', body }),
    params({ practicalId: String(practicalId) }),
  );

describe('a deeply nested formula (item 7)', () => {
  it('is refused when saved, with the reason, and nothing changes', async () => {
    const before = (await models().Practical.findByPk(practicalId))!.instructions;
    for (const instructions of [NESTED_FORMULA, DEEP_SHORT]) {
      const res = await put(practicalBody({ instructions }));
      expect(res.status).toBe(400);
      expect((await res.json()).error).toMatch(/formula (is \d+ characters long|nests braces more than 30 deep)/);
    }
    expect((await models().Practical.findByPk(practicalId))!.instructions).toBe(before);
  });

  it('already stored, the practical still opens for staff and students: a notice instead of a 500', async () => {
    await models().Practical.update({ instructions: NESTED_FORMULA }, { where: { id: practicalId } });
    try {
      const res = await getPractical(
        await apiRequest(`/api/practicals/${practicalId}`, { as: world.people.instructor.id }),
        params({ practicalId: String(practicalId) }),
      );
      expect(res.status).toBe(200);
      const { instructionsHtml } = await res.json();
      expect(instructionsHtml).toContain('Not shown:');
      expect(instructionsHtml).toContain('characters long');
      // The student page renders with the same function.
      expect(renderInstructions(DEEP_SHORT)).toMatch(/Not shown:.*nests braces more than 30 deep/);
    } finally {
      await models().Practical.update({ instructions: 'Record the band.' }, { where: { id: practicalId } });
    }
  });

  it('Markdown that would exhaust the renderer (deep quotes, runs of emphasis) is shown as plain text with the reason', async () => {
    for (const md of ['> '.repeat(2000) + 'x', '*'.repeat(20_000)]) {
      const html = renderInstructions(md);
      expect(html).toMatch(/Not shown:/);
    }
    const res = await markdownPreview(
      await apiRequest('/api/practicals/markdown', { as: world.people.instructor.id, body: { markdown: NESTED_FORMULA } }),
      {},
    );
    expect(res.status).toBe(200);
    expect((await res.json()).html).toMatch(/Not shown:/);
  });

  it('ordinary instructions still render their formulas', () => {
    const html = renderInstructions('Compute $k = 4\\pi^2 c^2 \\tilde\\nu^2 \\mu$ and $$\\frac{1}{2}$$ with *care*.');
    expect(html).toContain('class="katex"');
    expect(html).toContain('<em>care</em>');
    expect(html).not.toContain('Not shown');
  });
});

describe('control characters (item 7)', () => {
  it('a NUL byte in a cohort name or a practical title is refused at once, nothing is written', async () => {
    const cohorts = await models().Cohort.count();
    const res = await createCohort(
      await apiRequest(`/api/courses/${world.course.id}/cohorts`, {
        as: world.people.instructor.id,
        body: { name: 'Group\u0000A', term: '2027 Spring' },
      }),
      params({ courseId: String(world.course.id) }),
    );
    expect(res.status).toBe(400);
    expect((await res.json()).error).toMatch(/one line, without tabs or control characters/);
    expect(await models().Cohort.count()).toBe(cohorts);
    const title = await put(practicalBody({ title: 'Band\u0000centre' }));
    expect(title.status).toBe(400);
    const hazard = await put(practicalBody({ hazardNotes: 'Corrosive\u0000gas' }));
    expect(hazard.status).toBe(400);
    expect((await hazard.json()).error).toMatch(/control characters/);
    expect((await models().Practical.findByPk(practicalId))!.title).toBe('HCl fundamental band');
  });

  it('line breaks stay allowed in multi-line text and refused in one-line fields', async () => {
    const ok = await put(practicalBody({ title: 'HCl fundamental band', instructions: 'Line one.\r\nLine two.\n\n\tIndented.' }));
    expect(ok.status).toBe(200);
    const res = await createCourse(
      await apiRequest('/api/courses', {
        as: world.people.admin.id,
        body: { code: 'CRLF-1', title: 'Spectroscopy\r\nBcc: someone@example.org' },
      }),
      {},
    );
    expect(res.status).toBe(400);
    expect((await res.json()).error).toMatch(/one line/);
    const patch = await updateCourse(
      await apiRequest(`/api/courses/${world.course.id}`, {
        as: world.people.admin.id,
        method: 'PATCH',
        body: { title: 'Renamed\nsecond line' },
      }),
      params({ courseId: String(world.course.id) }),
    );
    expect(patch.status).toBe(400);
  });

  it('a title stored with CR/LF before the rule no longer cuts an e-mail subject', async () => {
    const { subject, text } = renderEmail('invitation', {
      name: 'Ada',
      email: 'ada@test.example',
      course: 'CHEM 1\r\nBcc: x@example.org',
      role: 'student',
      link: 'http://x',
      expires: 'soon',
      days: 7,
    });
    expect(subject).toBe('Your Oscillab account for CHEM 1 Bcc: x@example.org');
    expect(text.split('\n')[0]).toBe('Dear Ada,');
    await queueEmail({ dedupeKey: 'crlf-subject', to: 'ada@test.example', subject: 'A\r\nB\u0000C', text: 'x' });
    expect((await models().EmailOutbox.findOne({ where: { dedupeKey: 'crlf-subject' } }))!.subject).toBe('A B C');
  });
});
