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
  return ROLE_HOMES.filter((h) =>
    h.role === 'admin' ? actor.isAdmin : actor.memberships.some((m) => m.role === h.role),
  );
}
