/** Client-side calls to the instructor API routes: JSON in, JSON (or a readable error) out. */
export type ApiResult<T = Record<string, unknown>> = { ok: boolean; status: number; data: T & { error?: string; fields?: Record<string, string[]> } };

export async function send<T = Record<string, unknown>>(method: string, url: string, body?: unknown, raw?: { body: BodyInit; type: string }): Promise<ApiResult<T>> {
  const res = await fetch(url, {
    method,
    headers: raw ? { 'content-type': raw.type } : body !== undefined ? { 'content-type': 'application/json' } : undefined,
    body: raw ? raw.body : body !== undefined ? JSON.stringify(body) : undefined,
  });
  let data: ApiResult<T>['data'];
  try {
    data = await res.json();
  } catch {
    data = { error: `The server answered ${res.status}.` } as ApiResult<T>['data'];
  }
  return { ok: res.ok, status: res.status, data };
}

export const fetcher = async <T,>(url: string): Promise<T> => {
  const r = await send<T>('GET', url);
  if (!r.ok) throw new Error(r.data.error ?? `Error ${r.status}`);
  return r.data;
};
