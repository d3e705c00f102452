/**
 * Request and run ids on real routes and workers (lib/log.ts): an API route answers with
 * X-Request-Id whatever the outcome, and the outbox and storage-sweep runs log under a run id.
 */
import { Writable } from 'node:stream';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { apiRequest, params } from '../helpers/session';
import { buildWorld } from '../helpers/world';
import { GET as getMe } from '@/app/api/me/route';
import { GET as getCourse } from '@/app/api/courses/[courseId]/route';
import { deliverOutbox, queueEmail } from '@/lib/mail/outbox';
import { sweepOrphanFiles } from '@/lib/storage-sweep';
import { setLogDestination } from '@/lib/log';
import { renderEmail } from '@/lib/templates';

type Line = Record<string, unknown>;
let lines: Line[];
const level = process.env.LOG_LEVEL;
beforeEach(() => {
  lines = [];
  process.env.LOG_LEVEL = 'info';
  setLogDestination(
    new Writable({
      write(chunk, _enc, done) {
        for (const l of String(chunk).split('\n').filter(Boolean)) lines.push(JSON.parse(l));
        done();
      },
    }),
  );
});
afterEach(() => {
  process.env.LOG_LEVEL = level;
  setLogDestination(null);
});

describe('request ids on API routes', () => {
  it('a 401, a 403, a 404 and a 200 all carry X-Request-Id, and the request line logs the status under it', async () => {
    const { course, people } = await buildWorld();
    const answers = [
      await getMe(await apiRequest('/api/me'), undefined),
      await getCourse(await apiRequest(`/api/courses/${course.id}`, { as: people.student.id }), params({ courseId: String(course.id) })),
      await getCourse(await apiRequest('/api/courses/not-a-number', { as: people.lead.id }), params({ courseId: 'not-a-number' })),
      await getMe(await apiRequest('/api/me', { as: people.lead.id, headers: { 'x-request-id': 'lb-0123456789abcdef' } }), undefined),
    ];
    expect(answers.map((r) => r.status)).toEqual([401, 403, 404, 200]);
    const ids = answers.map((r) => r.headers.get('x-request-id'));
    expect(ids[3]).toBe('lb-0123456789abcdef');
    expect(new Set(ids).size).toBe(4);
    for (const [i, r] of answers.entries()) {
      expect(lines.find((l) => l.msg === 'request' && l.requestId === ids[i])).toMatchObject({ status: r.status });
    }
  });
});

describe('run ids on background work', () => {
  it('an outbox run and a storage sweep each log under a run id of their own', async () => {
    const to = `logged-${Date.now()}@test.example`;
    const { subject, text } = renderEmail('test-message', { name: 'Test person' });
    await queueEmail({ dedupeKey: `log:${to}`, to, subject, text });
    const report = await deliverOutbox();
    await sweepOrphanFiles();
    const outbox = lines.find((l) => l.msg === 'outbox run');
    const sweep = lines.find((l) => l.run === 'storage-sweep');
    expect(outbox).toMatchObject({ run: 'outbox', sent: report.sent, failed: report.failed });
    expect(typeof outbox?.runId).toBe('string');
    expect(typeof sweep?.runId).toBe('string');
    expect(sweep?.runId).not.toBe(outbox?.runId);
  });
});
