/**
 * Route-handler plumbing: every API route is wrapped in `route`, which gives the request an id
 * (X-Request-Id, on every answer and every log line of the request), refuses cross-site writes,
 * turns HttpError and validation failures into JSON 4xx answers, and logs anything else as a 500
 * that names the request id.
 */
import { z, type ZodType } from 'zod';
import { HttpError } from './http-error';
import { log, newRunId, rootLogger, withLogger, type Logger } from './log';
import { requestHost, requestProtocol } from './client-address';
import { oneLine } from './schemas/text';

export { HttpError };

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);
export const MAX_JSON_BYTES = 1_000_000;
const MAX_JSON_DEPTH = 20;

export function json(body: unknown, status = 200, headers?: HeadersInit): Response {
  return Response.json(body, { status, headers: { 'Cache-Control': 'no-store', ...headers } });
}

export const REQUEST_ID_HEADER = 'x-request-id';
/** What an incoming X-Request-Id (from a proxy in front) must look like to be kept: a UUID or similar token. */
const WELL_FORMED_REQUEST_ID = /^[A-Za-z0-9][A-Za-z0-9._:-]{7,127}$/;

/** The request's id: the caller's X-Request-Id when well-formed, else a fresh one. */
export function requestIdOf(request: Request): string {
  const given = request.headers.get(REQUEST_ID_HEADER)?.trim();
  return given && WELL_FORMED_REQUEST_ID.test(given) ? given : newRunId();
}

/** The response with the request id in its headers (copied first when its headers are immutable, as a redirect's are). */
export function withRequestId(response: Response, requestId: string): Response {
  try {
    response.headers.set(REQUEST_ID_HEADER, requestId);
    return response;
  } catch {
    const headers = new Headers(response.headers);
    headers.set(REQUEST_ID_HEADER, requestId);
    return new Response(response.body, { status: response.status, statusText: response.statusText, headers });
  }
}

/** The logger of one request: its lines carry the request id, method and path. */
export function requestLogger(request: Request, requestId: string): Logger {
  return rootLogger().child({ requestId, method: request.method, path: new URL(request.url).pathname });
}

export function errorResponse(error: unknown, requestId?: string): Response {
  if (error instanceof HttpError) {
    return json({ error: error.message, ...(error.fields ? { fields: error.fields } : {}) }, error.status);
  }
  log().error({ err: error }, 'unhandled error in route handler');
  const quote = requestId ? ` Quote request id ${requestId} when you report it.` : '';
  return json({ error: `Something went wrong on our side. The error has been logged.${quote}`, ...(requestId ? { requestId } : {}) }, 500);
}

/**
 * State-changing requests must come from a page of this site (common practice for CSRF
 * protection with cookie sessions): the browser's Origin header, or Sec-Fetch-Site, must say so.
 */
export function assertSameOrigin(request: Request): void {
  if (SAFE_METHODS.has(request.method)) return;
  const site = request.headers.get('sec-fetch-site');
  if (site === 'same-origin') return;
  const origin = request.headers.get('origin');
  if (!origin) throw new HttpError(403, 'Cross-site request refused: the Origin header is missing.');
  const url = new URL(request.url);
  // X-Forwarded-Host only counts when a trusted proxy set it (TRUSTED_PROXIES); a client can write it too.
  const host = requestHost(request.headers) ?? url.host;
  const allowed = new Set([url.origin, `${requestProtocol(request.headers, url.protocol)}//${host}`]);
  if (process.env.APP_ORIGIN) allowed.add(process.env.APP_ORIGIN);
  if (!allowed.has(origin)) throw new HttpError(403, 'Cross-site request refused.');
}

type Handler<C> = (request: Request, context: C) => Promise<Response>;

/**
 * Runs one API request under its id: `log()` inside carries it, the answer carries it in
 * X-Request-Id, one closing `request` line logs the status and time, and anything thrown becomes
 * the JSON answer `errorResponse` gives (a 500 naming the id, unless it is an HttpError).
 * `route` uses it for every API route; handlers of their own (next-auth's, the learning platform's
 * pages) call it directly.
 */
export function inRequest(request: Request, handle: (requestId: string, logger: Logger) => Promise<Response>): Promise<Response> {
  const requestId = requestIdOf(request);
  const logger = requestLogger(request, requestId);
  const started = performance.now();
  return withLogger(logger, async () => {
    let response: Response;
    try {
      response = await handle(requestId, logger);
    } catch (error) {
      response = errorResponse(error, requestId);
    }
    logger.info({ status: response.status, ms: Math.round(performance.now() - started) }, 'request');
    return withRequestId(response, requestId);
  });
}

export function route<C = unknown>(handler: Handler<C>): Handler<C> {
  return (request, context) =>
    inRequest(request, async () => {
      assertSameOrigin(request);
      return handler(request, context);
    });
}

function depth(value: unknown, level = 0): number {
  if (level > MAX_JSON_DEPTH) return level;
  if (value && typeof value === 'object') {
    let max = level;
    for (const v of Object.values(value)) max = Math.max(max, depth(v, level + 1));
    return max;
  }
  return level;
}

export function fieldErrors(error: z.ZodError): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = issue.path.join('.') || '_';
    // zod's own wording for a missing field ("expected string, received undefined") is not one a person can act on.
    const missing = issue.code === 'invalid_type' && / received undefined$/.test(issue.message);
    (out[key] ??= []).push(missing ? 'Required.' : issue.message);
  }
  return out;
}

export function validate<T>(schema: ZodType<T>, data: unknown): T {
  const parsed = schema.safeParse(data);
  if (!parsed.success) {
    const fields = fieldErrors(parsed.error);
    const first = Object.entries(fields)[0];
    throw new HttpError(400, first ? `Invalid input (${first[0]}): ${first[1][0]}` : 'Invalid input.', fields);
  }
  return parsed.data;
}

/** Read a JSON body of bounded size and depth, then validate it with the form's own zod schema. */
export async function readJson<T>(request: Request, schema: ZodType<T>): Promise<T> {
  const type = request.headers.get('content-type') ?? '';
  if (!type.includes('application/json')) throw new HttpError(415, 'Send the request body as JSON (Content-Type: application/json).');
  const declared = Number(request.headers.get('content-length') ?? 0);
  if (declared > MAX_JSON_BYTES) throw new HttpError(413, 'The request body is too large.');
  let text: string;
  try {
    text = await request.text();
  } catch {
    // The client went away mid-body (tab closed, connection reset): not a server fault.
    throw new HttpError(400, 'The request was interrupted before its body arrived; send it again.');
  }
  if (Buffer.byteLength(text) > MAX_JSON_BYTES) throw new HttpError(413, 'The request body is too large.');
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch {
    throw new HttpError(400, 'The request body is not valid JSON.');
  }
  if (depth(data) > MAX_JSON_DEPTH) throw new HttpError(400, 'The request body is nested too deeply.');
  return validate(schema, data);
}

/** A positive integer id from a URL segment; anything else is simply not found. */
export function idParam(value: string | undefined): number {
  const n = Number(value);
  if (!value || !/^\d{1,12}$/.test(value) || !Number.isSafeInteger(n) || n <= 0) throw new HttpError(404, 'Not found.');
  return n;
}

export const schemas = {
  id: z.number().int().positive().max(Number.MAX_SAFE_INTEGER),
  shortText: (max = 200) => oneLine(z.string().trim().min(1, 'Required.').max(max, `At most ${max} characters.`)),
};
