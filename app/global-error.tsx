'use client';
import './globals.css';

/**
 * The last resort, when even the page frame (the root layout) failed: it draws its own document,
 * with Oscillab's colours from globals.css and the system fonts.
 */
export default function GlobalError({ error, retry }: { error: unknown; retry: () => void }) {
  const digest = error instanceof Error ? (error as Error & { digest?: string }).digest : undefined;
  return (
    <html lang="en-GB">
      <body className="min-h-screen bg-paper text-ink">
        <title>Oscillab is unavailable</title>
        <main className="mx-auto max-w-lg px-4 py-16">
          <div className="card" role="alert">
            <p className="mb-3 text-lg font-bold tracking-tight">Oscillab</p>
            <h1 className="mb-2">Oscillab could not load this page</h1>
            <p className="text-ink-soft">
              Something went wrong on our side. Try again in a moment; drafts are saved as you type, so nothing is lost.
            </p>
            {digest && (
              <p className="mt-2 text-sm">
                Reference: <span className="num">{digest}</span>
              </p>
            )}
            <div className="mt-4 flex flex-wrap gap-2">
              <button type="button" className="btn" onClick={() => retry()}>
                Try again
              </button>
              {/* eslint-disable-next-line @next/next/no-html-link-for-pages -- the app's frame failed: a full page load, not the client router, is what can recover */}
              <a className="btn-quiet" href="/">
                Your home page
              </a>
            </div>
          </div>
        </main>
      </body>
    </html>
  );
}
