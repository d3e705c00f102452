import { invitationState } from '@/lib/instructor/invitations';
import { WelcomeForm } from '@/components/instructor/welcome-form';

export const metadata = { title: 'Set your password' };
export const dynamic = 'force-dynamic';

/** Public: the page an invitation link opens. The token itself is checked again when it is used. */
export default async function WelcomePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const state = await invitationState(token);
  return (
    <div className="mx-auto mt-10 max-w-md">
      <section className="card" aria-labelledby="welcome-heading">
        <h1 id="welcome-heading" className="mb-3">
          Welcome to Oscillab
        </h1>
        {state.ok ? (
          <>
            <p className="mb-4 text-ink-soft">
              Choose a password for <strong>{state.email}</strong> ({state.name}). The link works once.
            </p>
            <WelcomeForm token={token} email={state.email} />
          </>
        ) : (
          <p role="alert" className="rounded border border-danger bg-danger-soft px-3 py-2 text-sm text-danger">
            {state.message}
          </p>
        )}
      </section>
    </div>
  );
}
