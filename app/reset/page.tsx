import type { Metadata } from 'next';
import { ResetRequestForm } from './request-form';

export const metadata: Metadata = { title: 'Forgot your password?' };

/** Public: ask for a link to choose a new password. */
export default function ResetRequestPage() {
  return (
    <div className="mx-auto mt-10 grid max-w-3xl gap-8 md:grid-cols-[1fr_1.1fr]">
      <section aria-labelledby="reset-about" className="pt-2">
        <h1 id="reset-about" className="mb-3">
          Forgot your password?
        </h1>
        <p className="text-ink-soft">
          Give the e-mail address you sign in with. If it belongs to an account, Oscillab sends a link to choose a new password. The link
          works once and for one hour; asking again replaces the earlier link.
        </p>
      </section>
      <section className="card" aria-labelledby="reset-heading">
        <h2 id="reset-heading" className="mb-4">
          Reset your password
        </h2>
        <ResetRequestForm />
        <p className="hint mt-4">
          Remembered it? <a href="/signin">Back to sign in</a>.
        </p>
      </section>
    </div>
  );
}
