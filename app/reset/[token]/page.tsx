import Link from 'next/link';
import type { Metadata } from 'next';
import { resetTokenState } from '@/lib/auth/reset';
import { WelcomeForm } from '@/components/instructor/welcome-form';

export const metadata: Metadata = { title: 'Choose a new password' };
export const dynamic = 'force-dynamic';

/**
 * Public: the page a password-reset link opens. It shares the set-password form of invitation
 * links; the token is checked again, and used up, when the form is sent.
 */
export default async function ResetPasswordPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const state = await resetTokenState(token);
  return (
    <div className="mx-auto mt-10 max-w-md">
      <section className="card" aria-labelledby="reset-password-heading">
        <h1 id="reset-password-heading" className="mb-3">
          Choose a new password
        </h1>
        {state.ok ? (
          <>
            <p className="mb-4 text-ink-soft">
              New password for <strong>{state.email}</strong> ({state.name}). The link works once; earlier reset links no longer work.
            </p>
            <WelcomeForm token={token} email={state.email} />
          </>
        ) : (
          <>
            <p role="alert" className="rounded border border-danger bg-danger-soft px-3 py-2 text-sm text-danger">
              {state.message}
            </p>
            <p className="hint mt-4">
              <Link href="/reset">Ask for a new link</Link> or <Link href="/signin">go to sign in</Link>.
            </p>
          </>
        )}
      </section>
    </div>
  );
}
