import Link from 'next/link';
import { currentActor } from '@/lib/authz';
import { navLinksFor } from '@/lib/homes';
import { NavLinks } from './ui/nav-links';
import { SignOutButton } from './sign-out-button';
import { AccountMenu } from './account-menu';
import { Wordmark } from './wordmark';

export async function SiteHeader() {
  const actor = await currentActor();
  return (
    <header className="border-b border-rule bg-paper-raised">
      <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3 sm:px-5">
        <Link href="/" className="flex items-center gap-2 text-ink no-underline" aria-label="Oscillab home">
          <Wordmark />
        </Link>
        {actor && (
          <nav aria-label="Main" className="order-last flex w-full flex-wrap gap-x-4 gap-y-1 text-sm md:order-none md:w-auto md:flex-1">
            <NavLinks links={navLinksFor(actor)} />
          </nav>
        )}
        {actor && (
          <div className="ml-auto flex min-w-0 items-center gap-3 text-sm">
            <AccountMenu name={actor.name} email={actor.email} />
            <SignOutButton />
          </div>
        )}
      </div>
    </header>
  );
}
