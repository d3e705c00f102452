import Link from 'next/link';
import { currentActor } from '@/lib/authz';
import { homesFor } from '@/lib/homes';
import { SignOutButton } from './sign-out-button';
import { AccountMenu } from './account-menu';
import { Wordmark } from './wordmark';

export async function SiteHeader() {
  const actor = await currentActor();
  const homes = actor ? homesFor(actor) : [];
  return (
    <header className="border-b border-rule bg-paper-raised">
      <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-5 py-3">
        <Link href="/" className="flex items-center gap-2 text-ink no-underline" aria-label="Oscillab home">
          <Wordmark />
        </Link>
        {actor && (
          <nav aria-label="Main" className="flex flex-1 flex-wrap gap-4 text-sm">
            {homes.map((h) => (
              <Link key={h.href} href={h.href} className="font-bold text-ink-soft hover:text-accent">
                {h.label}
              </Link>
            ))}
          </nav>
        )}
        {actor && (
          <div className="ml-auto flex items-center gap-3 text-sm">
            <AccountMenu name={actor.name} email={actor.email} />
            <SignOutButton />
          </div>
        )}
      </div>
    </header>
  );
}
