/** Calls to the learning platform: a timeout on each, and answers read only up to a bounded size. */
import { limits } from './config';

export class PlatformUnreachable extends Error {
  constructor(
    public url: string,
    cause: string,
  ) {
    super(`The learning platform did not answer at ${url} (${cause}).`);
  }
}

export class PlatformAnswered extends Error {
  constructor(
    public url: string,
    public status: number,
    public body: string,
  ) {
    super(`The learning platform answered ${status} at ${url}${body ? `: ${body.slice(0, 200)}` : ''}.`);
  }
}

export type PlatformResponse = { status: number; headers: Headers; text: string };

export async function platformFetch(url: string, init: RequestInit = {}, maxBytes = limits.maxResponseBytes): Promise<PlatformResponse> {
  let res: Response;
  try {
    res = await fetch(url, { ...init, redirect: 'error', signal: AbortSignal.timeout(limits.fetchTimeoutMs()) });
  } catch (error) {
    const e = error as Error & { cause?: { code?: string } };
    throw new PlatformUnreachable(url, e.name === 'TimeoutError' ? 'timed out' : (e.cause?.code ?? e.message));
  }
  const declared = Number(res.headers.get('content-length') ?? 0);
  if (declared > maxBytes) {
    await res.body?.cancel();
    throw new PlatformAnswered(url, res.status, 'the answer is too large');
  }
  const chunks: Uint8Array[] = [];
  let size = 0;
  if (res.body) {
    const reader = res.body.getReader();
    for (;;) {
      let part: ReadableStreamReadResult<Uint8Array>;
      try {
        part = await reader.read();
      } catch (error) {
        throw new PlatformUnreachable(url, (error as Error).name === 'TimeoutError' ? 'timed out' : 'the answer was cut off');
      }
      if (part.done) break;
      size += part.value.byteLength;
      if (size > maxBytes) {
        await reader.cancel();
        throw new PlatformAnswered(url, res.status, 'the answer is too large');
      }
      chunks.push(part.value);
    }
  }
  return { status: res.status, headers: res.headers, text: Buffer.concat(chunks).toString('utf8') };
}

/** JSON from a 2xx answer; anything else throws PlatformAnswered. */
export async function platformJson<T>(url: string, init: RequestInit = {}): Promise<{ data: T; headers: Headers; status: number }> {
  const res = await platformFetch(url, init);
  if (res.status < 200 || res.status >= 300) throw new PlatformAnswered(url, res.status, res.text);
  try {
    return { data: (res.text ? JSON.parse(res.text) : null) as T, headers: res.headers, status: res.status };
  } catch {
    throw new PlatformAnswered(url, res.status, 'the answer is not JSON');
  }
}
