/**
 * The few pages the launch endpoints answer with themselves (before anyone is signed in, often in a
 * window the learning platform opened): refusals, the "opens in its own window" page and the
 * self-submitting forms of the protocol. Plain HTML with everything escaped; the look follows
 * Oscillab's tokens (tailwind.config.ts) without needing the app's layout.
 */
import { HttpError } from '@/lib/http-error';
import { inRequest } from '@/lib/http';

export function escapeHtml(value: unknown): string {
  return String(value ?? '').replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/** A launch Oscillab will not accept: a clear sentence for the person, a code for the logs and tests. */
export class LaunchRefused extends Error {
  constructor(
    public status: number,
    public code: string,
    public title: string,
    message: string,
    public advice = 'Go back to the learning platform and try again. If it keeps happening, tell your instructor or the site administrator, quoting the code below.',
  ) {
    super(message);
  }
}

const STYLE = `
  :root { color-scheme: light; }
  body { margin: 0; background: #fbfaf6; color: #1d2530; font: 15px/1.5 system-ui, sans-serif; }
  main { max-width: 36rem; margin: 2.5rem auto; padding: 0 1.25rem; }
  .card { background: #fff; border: 1px solid #d9d5c8; border-radius: .375rem; padding: 1.25rem; box-shadow: 0 1px 3px rgba(29,37,48,.06); }
  .mark { font-weight: 700; letter-spacing: -.01em; color: #1f5f74; margin: 0 0 1rem; }
  h1 { font-size: 1.25rem; margin: 0 0 .5rem; }
  .refused h1::before { content: "✗ "; color: #a3261c; }
  p { margin: .5rem 0; }
  .soft { color: #4a5361; font-size: .8125rem; }
  code { font-family: ui-monospace, monospace; font-size: .8125rem; background: #f3f1ea; padding: 0 .25rem; border-radius: .2rem; }
  .btn { display: inline-block; background: #1f5f74; color: #fff; border: 1px solid #1f5f74; border-radius: .25rem; padding: .4rem .8rem; font-weight: 700; text-decoration: none; font-size: .875rem; cursor: pointer; }
  .btn:focus-visible, a:focus-visible { outline: 2px solid #1f5f74; outline-offset: 2px; }
`;

export function htmlPage(options: {
  title: string;
  body: string;
  status?: number;
  className?: string;
  headers?: Record<string, string>;
}): Response {
  const html = `<!doctype html><html lang="en-GB"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${escapeHtml(options.title)} · Oscillab</title><style>${STYLE}</style></head><body><main class="${options.className ?? ''}"><p class="mark">Oscillab</p><div class="card">${options.body}</div></main></body></html>`;
  return new Response(html, {
    status: options.status ?? 200,
    headers: {
      'content-type': 'text/html; charset=utf-8',
      'cache-control': 'no-store',
      'referrer-policy': 'no-referrer',
      ...options.headers,
    },
  });
}

export function refusalPage(error: LaunchRefused, headers?: Record<string, string>): Response {
  return htmlPage({
    title: error.title,
    status: error.status,
    className: 'refused',
    headers: { 'x-oscillab-refusal': error.code, ...headers },
    body: `<h1>${escapeHtml(error.title)}</h1><p>${escapeHtml(error.message)}</p><p>${escapeHtml(error.advice)}</p><p class="soft">Code: <code>${escapeHtml(error.code)}</code>.${error.status < 500 || error.code === 'keyset-unreachable' ? ' Nothing was changed in Oscillab.' : ''}</p>`,
  });
}

/** A form that submits itself (with a button for browsers without scripts), as the standard's form_post messages do. */
export function selfSubmittingForm(options: {
  title: string;
  action: string;
  fields: Record<string, string>;
  lead: string;
  button: string;
}): Response {
  const inputs = Object.entries(options.fields)
    .map(([k, v]) => `<input type="hidden" name="${escapeHtml(k)}" value="${escapeHtml(v)}">`)
    .join('');
  return htmlPage({
    title: options.title,
    body: `<h1>${escapeHtml(options.title)}</h1><p>${escapeHtml(options.lead)}</p><form id="carry" method="post" action="${escapeHtml(options.action)}">${inputs}<button class="btn" type="submit">${escapeHtml(options.button)}</button></form><script>document.getElementById('carry').submit()</script>`,
  });
}

type Handler<C> = (request: Request, context: C) => Promise<Response>;

/**
 * For the endpoints the learning platform's pages call across sites (login initiation, launch):
 * no Origin check here, because these requests come from the platform by design and carry their
 * own proof (a signed id_token bound to this browser's state cookie and a single-use nonce).
 * Every refusal is a page, never a stack trace.
 */
export function ltiRoute<C = unknown>(handler: Handler<C>): Handler<C> {
  return (request, context) =>
    inRequest(request, async (requestId, logger) => {
      try {
        return await handler(request, context);
      } catch (error) {
        if (error instanceof LaunchRefused) return refusalPage(error);
        if (error instanceof HttpError)
          return refusalPage(new LaunchRefused(error.status, 'bad-request', 'Oscillab could not use this request', error.message));
        logger.error({ err: error }, 'unhandled error in learning-platform endpoint');
        return refusalPage(
          new LaunchRefused(
            500,
            'server-error',
            'Something went wrong on our side',
            `The error has been logged; quote request id ${requestId} when you report it.`,
          ),
        );
      }
    });
}
