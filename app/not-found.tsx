import Link from 'next/link';

export const metadata = { title: 'Not found' };

/** An address that leads nowhere: a link that is out of date, or a submission or practical that does not exist. */
export default function NotFound() {
  return (
    <div className="card mx-auto mt-10 max-w-lg">
      <h1 className="mb-2">Nothing here</h1>
      <p className="text-ink-soft">
        There is no page at this address. The link may be out of date, or the practical or submission it pointed to no longer exists.
      </p>
      <p className="mt-4">
        <Link className="btn-quiet" href="/">
          Your home page
        </Link>
      </p>
    </div>
  );
}
