/** A plain form POST (no client script): the route ends the session, removes the cookie and goes to sign-in. */
export function SignOutButton() {
  return (
    <form method="post" action="/api/me/sign-out">
      <button type="submit" className="btn-quiet">
        Sign out
      </button>
    </form>
  );
}
