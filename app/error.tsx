'use client';
import { useEffect } from 'react';
import Link from 'next/link';

/** Anything that fails while a page is drawn lands here, inside Oscillab's own frame. */
export default function PageError({ error, retry }: { error: unknown; retry: () => void }) {
  useEffect(() => {
    console.error(error);
  }, [error]);
  const digest = error instanceof Error ? (error as Error & { digest?: string }).digest : undefined;
  return (
    <div className="card mx-auto mt-10 max-w-lg" role="alert">
      <h1 className="mb-2">This page could not be shown</h1>
      <p className="text-ink-soft">
        Something went wrong on our side while preparing it. Nothing you entered has been lost: drafts are saved as you type. Try again; if
        it keeps happening, tell your course team{digest ? ' and quote the reference below' : ''}.
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
        <Link className="btn-quiet" href="/">
          Your home page
        </Link>
      </div>
    </div>
  );
}
