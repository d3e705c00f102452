/**
 * Who is on the other end of a request. The per-address sign-in and reset limits and the
 * same-origin check must not believe headers a client can write itself, so:
 *
 * - At the edge (`guardForwardedHeaders`, installed by instrumentation.ts on the Node HTTP server
 *   before Next sees the request), the connection's own address is appended to X-Forwarded-For,
 *   as a proxy would; with no trusted proxy (TRUSTED_PROXIES=0, the default) whatever the client
 *   sent is dropped first, and so are X-Forwarded-Host, -Proto and -Port.
 * - In the app (`clientAddress`), the client is the entry TRUSTED_PROXIES places from the right
 *   of X-Forwarded-For: each trusted proxy appended the address it was reached from, and entries
 *   further left were written by the client and are ignored.
 */
import type { IncomingMessage } from 'node:http';

/** How many reverse proxies in front of the app append to X-Forwarded-For (TRUSTED_PROXIES, default 0). */
export function trustedProxies(): number {
  const raw = process.env.TRUSTED_PROXIES;
  if (raw === undefined || raw.trim() === '') return 0;
  const n = Number(raw);
  return Number.isInteger(n) && n >= 0 && n <= 10 ? n : 0;
}

type HeaderBag = Headers | Record<string, string | string[] | undefined> | undefined | null;

function header(headers: HeaderBag, name: string): string | undefined {
  if (!headers) return undefined;
  if (typeof (headers as Headers).get === 'function') return (headers as Headers).get(name) ?? undefined;
  const v = (headers as Record<string, string | string[] | undefined>)[name];
  return Array.isArray(v) ? v.join(',') : v;
}

/** An address as one spelling: IPv4 written as IPv6-mapped (::ffff:127.0.0.1) counts as the IPv4 address. */
const canonical = (address: string) =>
  address
    .trim()
    .replace(/^::ffff:(?=\d+\.\d+\.\d+\.\d+$)/i, '')
    .toLowerCase();

/** The client's address as the trusted part of X-Forwarded-For says; 'local' when there is none (a call from inside). */
export function clientAddress(headers: HeaderBag): string {
  const hops = (header(headers, 'x-forwarded-for') ?? '')
    .split(',')
    .map((h) => h.trim())
    .filter(Boolean);
  if (!hops.length) return 'local';
  const at = Math.max(0, hops.length - 1 - trustedProxies());
  return canonical(hops[at]).slice(0, 100) || 'local';
}

/** The host the browser addressed: X-Forwarded-Host only when a trusted proxy set it, else Host. */
export function requestHost(headers: HeaderBag): string | undefined {
  const forwarded = trustedProxies() > 0 ? header(headers, 'x-forwarded-host')?.split(',').pop()?.trim() : undefined;
  return forwarded || header(headers, 'host') || undefined;
}

/** The scheme the browser used: X-Forwarded-Proto only when a trusted proxy set it, else the request URL's. */
export function requestProtocol(headers: HeaderBag, fallback: string): string {
  const forwarded = trustedProxies() > 0 ? header(headers, 'x-forwarded-proto')?.split(',').pop()?.trim().toLowerCase() : undefined;
  return forwarded === 'https' || forwarded === 'http' ? `${forwarded}:` : fallback;
}

const FORWARDED = ['x-forwarded-host', 'x-forwarded-proto', 'x-forwarded-port', 'forwarded', 'x-real-ip'];

/** Rewrites one incoming request's forwarding headers as described above (exported for tests). */
export function normaliseForwardedHeaders(req: IncomingMessage): void {
  const peer = req.socket?.remoteAddress;
  const trusted = trustedProxies();
  if (trusted === 0) {
    delete req.headers['x-forwarded-for'];
    for (const h of FORWARDED) delete req.headers[h];
  }
  if (!peer) return;
  const before = req.headers['x-forwarded-for'];
  const list = (Array.isArray(before) ? before.join(',') : (before ?? ''))
    .split(',')
    .map((h) => h.trim())
    .filter(Boolean);
  list.push(canonical(peer));
  // Only the entries the trusted proxies are answerable for (and one more: the client) matter.
  req.headers['x-forwarded-for'] = list.slice(-(trusted + 1)).join(', ');
}

let installed = false;

/** Installs the rewrite on every Node HTTP(S) server of this process (called once from instrumentation.ts). */
export async function guardForwardedHeaders(): Promise<void> {
  if (installed) return;
  installed = true;
  const http = await import('node:http');
  const https = await import('node:https');
  for (const proto of [http.Server.prototype, https.Server.prototype] as {
    emit: (event: string | symbol, ...args: unknown[]) => boolean;
  }[]) {
    const emit = proto.emit;
    proto.emit = function (this: unknown, event: string | symbol, ...args: unknown[]) {
      if (event === 'request' && args[0]) normaliseForwardedHeaders(args[0] as IncomingMessage);
      return emit.call(this, event, ...args);
    };
  }
}
