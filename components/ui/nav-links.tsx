'use client';
import Link from 'next/link';
import { usePathname } from 'next/navigation';
import type { NavLink } from '@/lib/homes';

/** The header's links, the current section marked for assistive technology and by an underline. */
export function NavLinks({ links }: { links: NavLink[] }) {
  const path = usePathname() ?? '';
  return (
    <>
      {links.map((l) => {
        const current = path === l.href || path.startsWith(`${l.href}/`);
        return (
          <Link
            key={l.href}
            href={l.href}
            aria-current={current ? 'page' : undefined}
            className={`font-bold hover:text-accent ${current ? 'text-ink underline decoration-2 underline-offset-4' : 'text-ink-soft'}`}
          >
            {l.label}
          </Link>
        );
      })}
    </>
  );
}
