/**
 * The account menu in the header: who is signed in, and "sign out everywhere", which ends the
 * account's sessions on every device (a lost phone, a shared lab computer) before signing out here.
 * A disclosure and a plain form POST: no client script.
 */
export function AccountMenu({ name, email }: { name: string; email: string }) {
  return (
    <details className="sm:relative">
      <summary
        className="cursor-pointer list-none rounded px-1 font-bold text-ink-soft hover:text-accent"
        data-testid="signed-in-as"
        aria-label={`Account menu for ${name}`}
      >
        {name} <span aria-hidden="true">▾</span>
      </summary>
      <div className="absolute inset-x-4 z-20 mt-2 rounded border border-rule bg-paper-raised p-3 shadow-card sm:inset-x-auto sm:right-0 sm:w-72">
        <p className="mb-2 break-all text-ink-soft">Signed in as {email}</p>
        <form method="post" action="/api/me/sign-out-everywhere">
          <button type="submit" className="btn-quiet w-full justify-center">
            Sign out everywhere
          </button>
        </form>
        <p className="mt-2 text-xs text-ink-soft">Ends your sessions on every device and browser, this one included.</p>
      </div>
    </details>
  );
}
