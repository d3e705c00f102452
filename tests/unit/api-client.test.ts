import { afterEach, describe, expect, it, vi } from 'vitest';
import { api, ApiError, getJson, postStream } from '@/lib/api-client';

const json = (body: unknown, status = 200, type = 'application/json') =>
  new Response(typeof body === 'string' ? body : JSON.stringify(body), { status, headers: { 'content-type': type } });

function stubFetch(answer: (url: string, init: RequestInit) => Response | Promise<Response>) {
  const calls: { url: string; init: RequestInit }[] = [];
  vi.stubGlobal('fetch', async (url: string, init: RequestInit) => {
    calls.push({ url, init });
    return answer(url, init);
  });
  return calls;
}

afterEach(() => vi.unstubAllGlobals());

describe('api', () => {
  it('sends JSON and answers the data', async () => {
    const calls = stubFetch(() => json({ id: 7 }, 201));
    const r = await api.post<{ id: number }>('/api/x', { a: 1 });
    expect(r).toEqual({ ok: true, status: 201, data: { id: 7 } });
    expect(calls[0].init.method).toBe('POST');
    expect(calls[0].init.body).toBe('{"a":1}');
    expect((calls[0].init.headers as Record<string, string>)['content-type']).toBe('application/json');
  });

  it('sends a form and a raw file as they are, with the raw file’s type', async () => {
    const calls = stubFetch(() => json({}));
    const fd = new FormData();
    fd.set('kind', 'report');
    await api.post('/api/uploads', fd);
    expect(calls[0].init.body).toBe(fd);
    expect((calls[0].init.headers as Record<string, string>)['content-type']).toBeUndefined(); // the browser sets the boundary
    await api.post('/api/roster', { raw: 'a,b', type: 'text/csv' });
    expect(calls[1].init.body).toBe('a,b');
    expect((calls[1].init.headers as Record<string, string>)['content-type']).toBe('text/csv');
  });

  it('turns a refusal into an ApiError with the server’s sentence, its fields and the rest of the body', async () => {
    stubFetch(() => json({ error: 'Invalid input (title): Required', fields: { title: ['Required'] }, submissions: 3 }, 409));
    const r = await api.put('/api/x', {});
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error).toBeInstanceOf(ApiError);
    expect(r.status).toBe(409);
    expect(r.error.message).toBe('Invalid input (title): Required');
    expect(r.error.fields).toEqual({ title: ['Required'] });
    expect(r.error.body.submissions).toBe(3);
  });

  it('names the status when a refusal is not JSON, and says so when the server cannot be reached', async () => {
    stubFetch(() => new Response('<html>Bad gateway</html>', { status: 502 }));
    const r = await api.get('/api/x');
    expect(!r.ok && r.error.message).toBe('The server answered 502.');
    vi.stubGlobal('fetch', async () => {
      throw new TypeError('Failed to fetch');
    });
    const down = await api.get('/api/x');
    expect(!down.ok && down.status).toBe(0);
    await expect(getJson('/api/x')).rejects.toMatchObject({ name: 'ApiError', status: 0 });
  });
});

describe('postStream', () => {
  const progress = (m: unknown): m is { done: number } => typeof (m as { done?: unknown }).done === 'number';

  it('passes each progress line on and answers the last line', async () => {
    stubFetch(() => json('{"done":1,"total":2}\n{"done":2,"total":2}\n{"released":2,"results":[]}\n', 200, 'application/x-ndjson'));
    const seen: number[] = [];
    const r = await postStream<{ released: number }, { done: number }>(
      '/api/release',
      {},
      { isProgress: progress, onProgress: (m) => seen.push(m.done), incomplete: 'stopped' },
    );
    expect(seen).toEqual([1, 2]);
    expect(r.ok && r.data.released).toBe(2);
  });

  it('is an ApiError when the stream ends without an answer or answers an error', async () => {
    stubFetch(() => json('{"done":1,"total":2}\n', 200, 'application/x-ndjson'));
    const cut = await postStream(
      '/api/release',
      {},
      { isProgress: progress, onProgress: () => {}, incomplete: 'The release stopped before it finished.' },
    );
    expect(!cut.ok && cut.error.message).toBe('The release stopped before it finished.');
    stubFetch(() => json('{"error":"Something went wrong on our side."}\n', 200, 'application/x-ndjson'));
    const failed = await postStream('/api/release', {}, { isProgress: progress, onProgress: () => {}, incomplete: 'x' });
    expect(!failed.ok && failed.error.message).toBe('Something went wrong on our side.');
  });
});
