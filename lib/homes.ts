import type { Actor } from './authz';

/** Each role's home page, in the order a person holding several roles sees them. */
export const ROLE_HOMES = [
  { role: 'admin', href: '/admin', label: 'Site administration' },
  { role: 'lead', href: '/statistics', label: 'Cohort statistics' },
  { role: 'instructor', href: '/courses', label: 'Courses & practicals' },
  { role: 'ta', href: '/marking', label: 'Marking' },
  { role: 'student', href: '/student', label: 'My practicals' },
] as const;

export type HomeRole = (typeof ROLE_HOMES)[number]['role'];

export const ROLE_NAMES: Record<HomeRole, string> = {
  admin: 'Site administrator',
  lead: 'Course lead',
  instructor: 'Instructor',
  ta: 'Teaching assistant',
  student: 'Student',
};

export function homesFor(actor: Actor) {
  return ROLE_HOMES.filter((h) => (h.role === 'admin' ? actor.isAdmin : actor.memberships.some((m) => m.role === h.role)));
}

export type NavLink = { href: string; label: string };

/**
 * The header's links: each role's home plus the other pages that role works in. A course lead or
 * instructor sets up courses, moderates and reads statistics; moderation is offered to those who
 * moderate a course they belong to (the page itself decides, through lib/authz/).
 */
export function navLinksFor(actor: Actor): NavLink[] {
  const roles = new Set(actor.memberships.map((m) => m.role));
  const manages = roles.has('lead') || roles.has('instructor');
  const links: NavLink[] = [];
  if (actor.isAdmin) links.push({ href: '/admin', label: 'Site administration' });
  if (manages)
    links.push(
      { href: '/statistics', label: 'Cohort statistics' },
      { href: '/courses', label: 'Courses & practicals' },
      { href: '/moderation', label: 'Moderation' },
    );
  if (roles.has('ta')) links.push({ href: '/marking', label: 'Marking' });
  if (roles.has('student')) links.push({ href: '/student', label: 'My practicals' });
  return links;
}
