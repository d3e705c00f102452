/**
 * Request ids and structured logs (lib/http.ts `route`, lib/log.ts): every answer carries
 * X-Request-Id, a well-formed id from the caller is kept and anything else replaced, and the log
 * lines of the request (the 500's stack included) carry the same id.
 */
import { Writable } from 'node:stream';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { HttpError, route } from '@/lib/http';
import { log, setLogDestination, withRun } from '@/lib/log';

type Line = Record<string, unknown> & { msg?: string; requestId?: string; level?: number };
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

const get = (headers: Record<string, string> = {}) => new Request('http://localhost:3000/api/example', { headers });
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/;

describe('request ids', () => {
  const ok = route(async () => {
    log().info('inside the handler');
    return Response.json({ ok: true });
  });

  it('every answer carries a fresh id when the caller sent none, and each request its own', async () => {
    const a = (await ok(get(), undefined)).headers.get('x-request-id');
    const b = (await ok(get(), undefined)).headers.get('x-request-id');
    expect(a).toMatch(UUID);
    expect(b).toMatch(UUID);
    expect(a).not.toBe(b);
  });

  it('keeps a well-formed X-Request-Id from the caller and replaces a malformed one', async () => {
    const given = 'edge-7f3a9c21-0001';
    expect((await ok(get({ 'x-request-id': given }), undefined)).headers.get('x-request-id')).toBe(given);
    for (const bad of ['short', 'has spaces in it!', 'x'.repeat(200), '<script>alert(1)</script>', '-leading-dash-id']) {
      const id = (await ok(get({ 'x-request-id': bad }), undefined)).headers.get('x-request-id');
      expect({ bad, id: UUID.test(id ?? '') }).toEqual({ bad, id: true });
    }
  });

  it('4xx answers and redirects (immutable headers) carry it too', async () => {
    const refused = route(async () => {
      throw new HttpError(403, 'No.');
    });
    const res = await refused(get({ 'x-request-id': 'proxy-id-12345678' }), undefined);
    expect(res.status).toBe(403);
    expect(res.headers.get('x-request-id')).toBe('proxy-id-12345678');
    const moved = route(async () => Response.redirect('http://localhost:3000/elsewhere', 303));
    const r = await moved(get({ 'x-request-id': 'proxy-id-87654321' }), undefined);
    expect([r.status, r.headers.get('location'), r.headers.get('x-request-id')]).toEqual([
      303,
      'http://localhost:3000/elsewhere',
      'proxy-id-87654321',
    ]);
  });

  it("the log lines of a request carry its id: the handler's own and the closing line with the status", async () => {
    const res = await ok(get({ 'x-request-id': 'trace-abcdef-42' }), undefined);
    const mine = lines.filter((l) => l.requestId === 'trace-abcdef-42');
    expect(mine.map((l) => l.msg)).toEqual(['inside the handler', 'request']);
    expect(mine[1]).toMatchObject({ status: 200, method: 'GET', path: '/api/example', app: 'oscillab' });
    expect(res.status).toBe(200);
  });

  it('an unexpected error is a 500 whose body names the request id, logged with the stack under that id', async () => {
    const broken = route(async () => {
      throw new Error('kaboom in the handler');
    });
    const res = await broken(get(), undefined);
    const id = res.headers.get('x-request-id')!;
    const body = (await res.json()) as { error: string; requestId: string };
    expect(res.status).toBe(500);
    expect(body.requestId).toBe(id);
    expect(body.error).toContain(id);
    expect(body.error).not.toContain('kaboom');
    const logged = lines.find((l) => l.level === 50 && l.requestId === id) as Line & { err: { message: string; stack: string } };
    expect(logged.err.message).toBe('kaboom in the handler');
    expect(logged.err.stack).toContain('request-id.test.ts');
  });
});

describe('background runs', () => {
  it('lines written during a run carry its kind and a run id of its own', async () => {
    const ids = await Promise.all(
      ['outbox', 'outbox'].map((run) =>
        withRun(run, async (logger) => {
          log().info('step');
          return logger.bindings().runId as string;
        }),
      ),
    );
    expect(ids[0]).not.toBe(ids[1]);
    expect(lines.filter((l) => l.msg === 'step').map((l) => [l.run, l.runId])).toEqual([
      ['outbox', ids[0]],
      ['outbox', ids[1]],
    ]);
  });
});
