/**
 * Every call the browser makes to Oscillab's API goes through this module: JSON (or a form, or a
 * raw file) in, typed JSON out, and one error type for every refusal. Route handlers answer a
 * refusal as `{ error, fields? }` (lib/http.ts); `ApiError` carries that message, the status and
 * the per-field messages, so every screen shows the server's own sentence the same way.
 *
 * Response types come from the server modules that produce them (`import type`, so no server
 * code reaches the browser); `Serialized<T>` (lib/serialized.ts) turns what a loader returns into
 * what JSON carries.
 *
 * Two ways to call:
 * - reads in components: `useApi<T>(url)` (SWR with `getJson` as fetcher; `error` is an ApiError);
 * - writes: `const r = await api.post<T>(url, body)`, then `r.ok ? r.data : r.error.message`.
 *   A result rather than a throw, because every form shows the refusal beside the button.
 */
import useSWR, { type SWRConfiguration } from 'swr';

/** A refusal from the API, or no answer at all (status 0). `message` is the server's sentence. */
export class ApiError extends Error {
  readonly status: number;
  /** Messages per form field, when the server names the fields it refused (zod failures). */
  readonly fields: Record<string, string[]>;
  /** The refusal's whole JSON, for the few that carry more (a 409's count of checked submissions). */
  readonly body: Record<string, unknown>;
  constructor(status: number, message: string, fields: Record<string, string[]> = {}, body: Record<string, unknown> = {}) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.fields = fields;
    this.body = body;
  }
}

export type ApiResult<T> = { ok: true; status: number; data: T } | { ok: false; status: number; error: ApiError };

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
/** A body sent as it is (a CSV file, a multipart form) rather than as JSON. */
export type RawBody = { raw: BodyInit; type?: string };

const isRaw = (b: unknown): b is RawBody => typeof b === 'object' && b !== null && 'raw' in b;

function init(method: Method, body: unknown, accept = 'application/json'): RequestInit {
  const headers: Record<string, string> = { accept };
  if (body === undefined) return { method, headers };
  if (body instanceof FormData) return { method, headers, body };
  if (isRaw(body)) return { method, headers: body.type ? { ...headers, 'content-type': body.type } : headers, body: body.raw };
  return { method, headers: { ...headers, 'content-type': 'application/json' }, body: JSON.stringify(body) };
}

async function refusal(res: Response): Promise<ApiError> {
  const parsed: unknown = await res.json().catch(() => ({}));
  const body = (typeof parsed === 'object' && parsed !== null ? parsed : {}) as Record<string, unknown>;
  const message = typeof body.error === 'string' && body.error ? body.error : `The server answered ${res.status}.`;
  const fields = typeof body.fields === 'object' && body.fields !== null ? (body.fields as Record<string, string[]>) : {};
  return new ApiError(res.status, message, fields, body);
}

const unreachable = () => new ApiError(0, 'The server could not be reached. Check the connection and try again.');

/** One call; never throws. */
export async function call<T>(method: Method, url: string, body?: unknown): Promise<ApiResult<T>> {
  let res: Response;
  try {
    res = await fetch(url, init(method, body));
  } catch {
    return { ok: false, status: 0, error: unreachable() };
  }
  if (!res.ok) return { ok: false, status: res.status, error: await refusal(res) };
  const data = (await res.json().catch(() => null)) as T;
  return { ok: true, status: res.status, data };
}

export const api = {
  get: <T>(url: string) => call<T>('GET', url),
  post: <T = unknown>(url: string, body?: unknown) => call<T>('POST', url, body),
  put: <T = unknown>(url: string, body?: unknown) => call<T>('PUT', url, body),
  patch: <T = unknown>(url: string, body?: unknown) => call<T>('PATCH', url, body),
  delete: <T = unknown>(url: string, body?: unknown) => call<T>('DELETE', url, body),
};

/** A read that throws the ApiError: SWR's fetcher, and for code that wants try/catch. */
export async function getJson<T>(url: string): Promise<T> {
  const r = await call<T>('GET', url);
  if (!r.ok) throw r.error;
  return r.data;
}

/** A read in a component, through SWR. `null` for the key fetches nothing. */
export function useApi<T>(url: string | null, config?: SWRConfiguration<T, ApiError>) {
  return useSWR<T, ApiError>(url, getJson<T>, config);
}

/**
 * A POST whose answer streams as NDJSON: each line `isProgress` recognises goes to `onProgress`, any
 * other line is the answer. A server that does not stream (or refuses) is answered as by `call`;
 * a stream that ends without an answer is an ApiError with the `incomplete` message.
 */
export async function postStream<T, P>(
  url: string,
  body: unknown,
  stream: { isProgress: (line: unknown) => line is P; onProgress: (line: P) => void; incomplete: string },
): Promise<ApiResult<T>> {
  let res: Response;
  try {
    res = await fetch(url, init('POST', body, 'application/x-ndjson'));
  } catch {
    return { ok: false, status: 0, error: unreachable() };
  }
  if (!res.ok) return { ok: false, status: res.status, error: await refusal(res) };
  if (!res.body || !(res.headers.get('content-type') ?? '').includes('ndjson'))
    return { ok: true, status: res.status, data: (await res.json()) as T };
  const reader = res.body.pipeThrough(new TextDecoderStream()).getReader();
  let buffered = '';
  let answer: unknown = undefined;
  try {
    for (;;) {
      const { value, done } = await reader.read();
      if (done) break;
      buffered += value;
      const lines = buffered.split('\n');
      buffered = lines.pop() ?? '';
      for (const l of lines.filter(Boolean)) {
        const m: unknown = JSON.parse(l);
        if (stream.isProgress(m)) stream.onProgress(m);
        else answer = m;
      }
    }
  } catch {
    return { ok: false, status: 0, error: new ApiError(0, stream.incomplete) };
  }
  if (answer === undefined) return { ok: false, status: res.status, error: new ApiError(res.status, stream.incomplete) };
  const error = (answer as { error?: unknown }).error;
  if (typeof error === 'string') return { ok: false, status: res.status, error: new ApiError(res.status, error) };
  return { ok: true, status: res.status, data: answer as T };
}
