import Link from 'next/link';
import type { Metadata } from 'next';
import { redirect } from 'next/navigation';
import { currentActor } from '@/lib/authz';
import { SignInForm } from '@/components/sign-in-form';
import { SIGN_IN_ERRORS } from '@/lib/schemas/auth';
import { safeNextPath } from '@/lib/next-path';

export const metadata: Metadata = { title: 'Sign in' };

export default async function SignInPage({
  searchParams,
}: {
  searchParams: Promise<{ error?: string; callbackUrl?: string; next?: string }>;
}) {
  const { error, next: rawNext } = await searchParams;
  const next = safeNextPath(rawNext) ?? '/';
  if (await currentActor()) redirect(next);
  const message = error ? (SIGN_IN_ERRORS[error] ?? SIGN_IN_ERRORS.CredentialsSignin) : undefined;
  return (
    <div className="mx-auto mt-10 grid max-w-3xl gap-8 md:grid-cols-[1fr_1.1fr]">
      <section aria-labelledby="about" className="pt-2">
        <h1 id="about" className="mb-3">
          Spectroscopy practicals, marked from the students’ own data
        </h1>
        <p className="text-ink-soft">
          Students submit their line lists, band centres and derived constants. Oscillab recomputes every number, judges it against the
          tolerance bands set for the cohort, names the likely slip and prepares the feedback.
        </p>
      </section>
      <section className="card" aria-labelledby="signin-heading">
        <h2 id="signin-heading" className="mb-4">
          Sign in
        </h2>
        <SignInForm initialError={message} next={next} />
        <p className="mt-3 text-sm">
          <Link href="/reset">Forgot your password?</Link>
        </p>
        <p className="hint mt-4">New accounts are set up from the invitation e-mail your department sends.</p>
      </section>
    </div>
  );
}
