'use client';
import { useState } from 'react';
import { signOut } from 'next-auth/react';

/**
 * The account menu in the header: who is signed in, and "sign out everywhere", which ends the
 * account's sessions on every device (a lost phone, a shared lab computer) before signing out here.
 */
export function AccountMenu({ name, email }: { name: string; email: string }) {
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);

  async function everywhere() {
    setBusy(true);
    setError(null);
    try {
      const res = await fetch('/api/me/sign-out-everywhere', { method: 'POST', headers: { 'content-type': 'application/json' } });
      if (!res.ok && res.status !== 401) throw new Error((await res.json().catch(() => ({}))).error ?? 'The sessions could not be ended.');
      await signOut({ callbackUrl: '/signin' });
    } catch (e) {
      setError(e instanceof Error ? e.message : 'The sessions could not be ended.');
      setBusy(false);
    }
  }

  return (
    <details className="sm:relative">
      <summary className="cursor-pointer list-none rounded px-1 font-bold text-ink-soft hover:text-accent" data-testid="signed-in-as" aria-label={`Account menu for ${name}`}>
        {name} <span aria-hidden="true">▾</span>
      </summary>
      <div className="absolute inset-x-4 z-20 mt-2 rounded border border-rule bg-paper-raised p-3 shadow-card sm:inset-x-auto sm:right-0 sm:w-72">
        <p className="mb-2 break-all text-ink-soft">Signed in as {email}</p>
        <button type="button" className="btn-quiet w-full justify-center" onClick={everywhere} disabled={busy}>
          {busy ? 'Signing out everywhere…' : 'Sign out everywhere'}
        </button>
        <p className="mt-2 text-xs text-ink-soft">Ends your sessions on every device and browser, this one included.</p>
        {error && (
          <p role="alert" className="error-text mt-2 text-xs">
            {error}
          </p>
        )}
      </div>
    </details>
  );
}
