import Link from 'next/link';

export const metadata = { title: 'Not permitted' };

export default function NotPermitted() {
  return (
    <div className="card mx-auto mt-10 max-w-lg" role="alert">
      <h1 className="mb-2">Not permitted</h1>
      <p className="text-ink-soft">
        Your account does not have access to this page. If you think it should, ask the instructor of the course.
      </p>
      <p className="mt-4">
        <Link href="/">Back to your home page</Link>
      </p>
    </div>
  );
}
