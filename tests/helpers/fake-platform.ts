/**
 * The learning-platform stand-in (scripts/fake-platform.ts) in its own process for a test file, and
 * the Oscillab route handlers the platform calls back (key set, login, launch …) served over HTTP
 * on loopback, so the whole exchange runs over real HTTP between two processes.
 * Ports: OSCILLAB_LTI_TEST_PORT, else E2E_PORT + 52 (3152 by default); each file takes its own pair.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import http from 'node:http';
import path from 'node:path';

export function testPorts(offset: number): { oscillab: number; platform: number } {
  const base = Number(process.env.OSCILLAB_LTI_TEST_PORT || Number(process.env.E2E_PORT || 3100) + 52);
  return { oscillab: base + offset * 2, platform: base + offset * 2 + 1 };
}

export type FakePlatform = {
  url: string;
  stop: () => Promise<void>;
  control: <T = Record<string, unknown>>(what: string, body?: unknown) => Promise<T>;
  state: () => Promise<PlatformState>;
};

export type PlatformState = {
  items: { id: string; title: string; custom: Record<string, string>; lineItemId: string | null }[];
  lineItems: { id: string; label: string; scoreMaximum: number; resourceId?: string; resourceLinkId?: string }[];
  results: {
    lineItemId: string;
    userId: string;
    scoreGiven: number;
    scoreMaximum: number;
    comment?: string;
    timestamp: string;
    gradingProgress: string;
    activityProgress: string;
  }[];
  deliveries: { lineItemId: string; userId: string; timestamp: string; applied: boolean }[];
  users: { id: string; name: string; email: string; roles: string[]; status: string }[];
  keys: { kid: string; active: boolean }[];
};

export async function startFakePlatform(port: number, oscillabUrl: string, extraEnv: Record<string, string> = {}): Promise<FakePlatform> {
  const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', path.resolve('scripts/fake-platform.ts')], {
    env: { ...process.env, FAKE_PLATFORM_PORT: String(port), OSCILLAB_URL: oscillabUrl, FAKE_PLATFORM_STATE: '', ...extraEnv },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  child.stdout?.on('data', (d) => (log += d));
  child.stderr?.on('data', (d) => (log += d));
  const url = `http://127.0.0.1:${port}`;
  const end = Date.now() + 20_000;
  for (;;) {
    try {
      if ((await fetch(`${url}/health`)).ok) break;
    } catch {}
    if (Date.now() > end || child.exitCode !== null) throw new Error(`the fake platform did not start on ${port}: ${log}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  const control = async <T>(what: string, body?: unknown): Promise<T> => {
    const res = await fetch(`${url}/control/${what}`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', accept: 'application/json' },
      body: JSON.stringify(body ?? {}),
    });
    if (!res.ok) throw new Error(`control ${what}: ${res.status}`);
    return (await res.json()) as T;
  };
  return {
    url,
    control,
    state: async () => (await (await fetch(`${url}/control/state`)).json()) as PlatformState,
    stop: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGTERM');
      }),
  };
}

type Handler = (request: Request, context: { params: Promise<Record<string, string>> }) => Promise<Response>;
export type Routes = [method: string, pattern: RegExp, handler: Handler, names?: string[]][];

/** Serve route handlers over HTTP (the way Next calls them: a web Request, params from the path). */
export async function serveHandlers(port: number, routes: Routes): Promise<{ url: string; close: () => Promise<void> }> {
  const server = http.createServer(async (req, res) => {
    const url = new URL(req.url ?? '/', `http://localhost:${port}`);
    const hit = routes.find(([m, p]) => m === req.method && p.test(url.pathname));
    if (!hit) {
      res.writeHead(404, { 'content-type': 'text/plain' });
      return res.end('not served in this test');
    }
    const match = hit[1].exec(url.pathname)!;
    const params = Object.fromEntries((hit[3] ?? []).map((n, i) => [n, match[i + 1]]));
    const chunks: Buffer[] = [];
    for await (const c of req) chunks.push(c as Buffer);
    const headers = new Headers();
    for (const [k, v] of Object.entries(req.headers)) if (typeof v === 'string') headers.set(k, v);
    const request = new Request(url, {
      method: req.method,
      headers,
      body: ['GET', 'HEAD'].includes(req.method!) ? undefined : Buffer.concat(chunks),
    });
    try {
      const response = await hit[2](request, { params: Promise.resolve(params) });
      const out: Record<string, string | string[]> = {};
      response.headers.forEach((v, k) => {
        if (k !== 'set-cookie') out[k] = v;
      });
      const cookies = response.headers.getSetCookie();
      if (cookies.length) out['set-cookie'] = cookies;
      res.writeHead(response.status, out);
      res.end(Buffer.from(await response.arrayBuffer()));
    } catch (error) {
      res.writeHead(500, { 'content-type': 'text/plain' });
      res.end(String(error));
    }
  });
  await new Promise<void>((resolve) => server.listen(port, '127.0.0.1', resolve));
  return { url: `http://localhost:${port}`, close: () => new Promise<void>((resolve) => server.close(() => resolve())) };
}

// ——— A small browser: cookie jar per host, SameSite=Lax as browsers apply it, forms ———————————————

type Cookie = { value: string; sameSite: 'lax' | 'strict' | 'none'; path: string };
export type Page = { url: string; status: number; html: string; headers: Headers };

const site = (u: string) => new URL(u).hostname;

export class Browser {
  jar = new Map<string, Map<string, Cookie>>();

  cookieHeader(url: string, initiator: string | null, method: string): string {
    const cookies = this.jar.get(site(url));
    if (!cookies) return '';
    // A cross-site POST carries no Lax or Strict cookie; a cross-site top-level GET carries Lax ones.
    const crossSite = initiator !== null && site(initiator) !== site(url);
    const out: string[] = [];
    for (const [name, c] of cookies) {
      if (!new URL(url).pathname.startsWith(c.path)) continue;
      if (crossSite && (c.sameSite === 'strict' || (c.sameSite === 'lax' && method !== 'GET'))) continue;
      out.push(`${name}=${c.value}`);
    }
    return out.join('; ');
  }

  store(url: string, headers: Headers) {
    for (const line of headers.getSetCookie()) {
      const [pair, ...attrs] = line.split(';').map((s) => s.trim());
      const eq = pair.indexOf('=');
      const name = pair.slice(0, eq);
      const value = pair.slice(eq + 1);
      const attr = (k: string) => attrs.find((a) => a.toLowerCase().startsWith(`${k}=`))?.split('=')[1];
      const jar = this.jar.get(site(url)) ?? new Map<string, Cookie>();
      this.jar.set(site(url), jar);
      if (attr('max-age') === '0' || value === '') jar.delete(name);
      else jar.set(name, { value, sameSite: (attr('samesite')?.toLowerCase() as Cookie['sameSite']) ?? 'lax', path: attr('path') ?? '/' });
    }
  }

  cookie(host: string, name: string): string | undefined {
    return this.jar.get(host)?.get(name)?.value;
  }

  /** A navigation (top level): follows redirects while `follow(url)` says so. */
  async go(
    url: string,
    options: { method?: string; form?: Record<string, string>; initiator?: string | null; follow?: (url: string) => boolean } = {},
  ): Promise<Page> {
    let method = options.method ?? (options.form ? 'POST' : 'GET');
    let body: string | undefined = options.form ? new URLSearchParams(options.form).toString() : undefined;
    let initiator = options.initiator ?? null;
    let current = url;
    for (let hop = 0; hop < 15; hop++) {
      const headers: Record<string, string> = {};
      const cookie = this.cookieHeader(current, initiator, method);
      if (cookie) headers.cookie = cookie;
      if (body !== undefined) headers['content-type'] = 'application/x-www-form-urlencoded';
      if (method === 'POST' && initiator) headers.origin = new URL(initiator).origin;
      headers['sec-fetch-dest'] = 'document';
      headers['sec-fetch-site'] =
        initiator === null
          ? 'none'
          : new URL(initiator).origin === new URL(current).origin
            ? 'same-origin'
            : site(initiator) === site(current)
              ? 'same-site'
              : 'cross-site';
      const res = await fetch(current, { method, headers, body, redirect: 'manual' });
      this.store(current, res.headers);
      const location = res.headers.get('location');
      if (res.status >= 300 && res.status < 400 && location) {
        const next = new URL(location, current).toString();
        if (options.follow && !options.follow(next)) return { url: next, status: res.status, html: '', headers: res.headers };
        initiator = current;
        current = next;
        if (res.status !== 307 && res.status !== 308) {
          method = 'GET';
          body = undefined;
        }
        continue;
      }
      return { url: current, status: res.status, html: await res.text(), headers: res.headers };
    }
    throw new Error('too many redirects');
  }

  /** Submit the page's first form (as its script or a click would). */
  async submit(page: Page, extra: Record<string, string> = {}, follow?: (url: string) => boolean): Promise<Page> {
    const form = /<form[^>]*action="([^"]*)"[^>]*>([\s\S]*?)<\/form>/i.exec(page.html);
    if (!form) throw new Error(`no form on ${page.url}: ${page.html.slice(0, 300)}`);
    const unescape = (s: string) =>
      s
        .replace(/&quot;/g, '"')
        .replace(/&#39;/g, "'")
        .replace(/&lt;/g, '<')
        .replace(/&gt;/g, '>')
        .replace(/&amp;/g, '&');
    const fields: Record<string, string> = {};
    for (const m of form[2].matchAll(/<input type="hidden" name="([^"]*)" value="([^"]*)">/g)) fields[unescape(m[1])] = unescape(m[2]);
    return this.go(new URL(unescape(form[1]), page.url).toString(), {
      method: 'POST',
      form: { ...fields, ...extra },
      initiator: page.url,
      follow,
    });
  }
}

export const formFields = (html: string): Record<string, string> => {
  const out: Record<string, string> = {};
  for (const m of html.matchAll(/<input type="hidden" name="([^"]*)" value="([^"]*)">/g))
    out[m[1]] = m[2]
      .replace(/&quot;/g, '"')
      .replace(/&#39;/g, "'")
      .replace(/&amp;/g, '&');
  return out;
};
