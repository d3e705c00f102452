'use client';
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import type { AdminPerson } from '@/lib/admin/people';
import { ROLE_NAMES } from '@/lib/homes';
import { Field } from '@/components/ui/field';
import { api } from '@/lib/api-client';

type GrantCourse = { id: number; code: string; title: string; archived: boolean; cohorts: { id: number; name: string; term: string }[] };
const ROLES = ['student', 'ta', 'instructor', 'lead'] as const;

/** The people found, each with their course roles (remove), and the form that grants a role. */
export function PeopleAdmin({ people, courses }: { people: AdminPerson[]; courses: GrantCourse[] }) {
  const router = useRouter();
  const [email, setEmail] = useState('');
  const [courseId, setCourseId] = useState(courses.find((c) => !c.archived)?.id ?? courses[0]?.id ?? 0);
  const [role, setRole] = useState<(typeof ROLES)[number]>('ta');
  const [cohortId, setCohortId] = useState('');
  const [msg, setMsg] = useState<{ ok: boolean; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const course = courses.find((c) => c.id === courseId);

  async function grant(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    const r = await api.post('/api/admin/memberships', { email, courseId, role, cohortId: cohortId ? Number(cohortId) : null });
    setBusy(false);
    setMsg(
      r.ok
        ? { ok: true, text: `${email} is now ${ROLE_NAMES[role].toLowerCase()} in ${course?.code}.` }
        : { ok: false, text: r.error.message },
    );
    if (r.ok) router.refresh();
  }

  async function remove(p: AdminPerson, m: AdminPerson['roles'][number]) {
    if (
      !window.confirm(
        `Remove ${p.name}'s role as ${ROLE_NAMES[m.role as keyof typeof ROLE_NAMES]?.toLowerCase() ?? m.role} in ${m.course}? Their work and marks stay.`,
      )
    )
      return;
    const r = await api.delete(`/api/admin/memberships/${m.membershipId}`);
    setMsg(r.ok ? { ok: true, text: `Removed ${p.name} as ${m.role} in ${m.course}.` } : { ok: false, text: r.error.message });
    if (r.ok) router.refresh();
  }

  return (
    <div className="space-y-4">
      <form onSubmit={grant} className="rounded border border-rule bg-paper p-3" aria-labelledby="grant-h" noValidate>
        <h3 id="grant-h" className="mb-2">
          Grant a course role
        </h3>
        <div className="grid gap-3 md:grid-cols-2 lg:grid-cols-[minmax(0,1fr)_minmax(0,1.3fr)] md:items-end">
          <Field id="grant-email" label="E-mail of the account">
            <input type="email" className="field" value={email} onChange={(e) => setEmail(e.target.value)} autoComplete="off" />
          </Field>
          <Field id="grant-course" label="Course">
            <select
              className="field"
              value={courseId}
              onChange={(e) => {
                setCourseId(Number(e.target.value));
                setCohortId('');
              }}
            >
              {courses.map((c) => (
                <option key={c.id} value={c.id}>
                  {c.code} · {c.title}
                  {c.archived ? ' (archived)' : ''}
                </option>
              ))}
            </select>
          </Field>
          <Field id="grant-role" label="Role">
            <select className="field" value={role} onChange={(e) => setRole(e.target.value as (typeof ROLES)[number])}>
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_NAMES[r]}
                </option>
              ))}
            </select>
          </Field>
          <Field id="grant-cohort" label={role === 'student' ? 'Cohort (required)' : 'Cohort (students only)'}>
            <select className="field" value={cohortId} onChange={(e) => setCohortId(e.target.value)} disabled={role !== 'student'}>
              <option value="">—</option>
              {course?.cohorts.map((c) => (
                <option key={c.id} value={c.id}>
                  {c.name} ({c.term})
                </option>
              ))}
            </select>
          </Field>
        </div>
        <button type="submit" className="btn mt-3" disabled={busy || !email.trim()}>
          Grant the role
        </button>
        <p aria-live="polite" className={msg?.ok ? 'mt-2 text-sm text-verdict-within' : 'error-text'} data-testid="admin-people-message">
          {msg ? `${msg.ok ? '✓' : '✗'} ${msg.text}` : ''}
        </p>
        <p className="hint">Roles are granted to existing accounts; instructors invite new people from their course page.</p>
      </form>
      <ul className="divide-y divide-rule" aria-label="People found">
        {people.map((p) => (
          <li key={p.id} className="py-3" data-person={p.email}>
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <p>
                <strong>{p.name}</strong> <span className="text-ink-soft">{p.email}</span>
                {p.studentNumber && <span className="num ml-2 text-sm text-ink-soft">{p.studentNumber}</span>}
                {p.isAdmin && <span className="ml-2 rounded bg-accent-soft px-1.5 text-xs font-bold text-accent">site administrator</span>}
                {p.invited && <span className="ml-2 text-xs text-ink-soft">(invited, no password yet)</span>}
              </p>
              <button
                type="button"
                className="btn-quiet"
                onClick={() => {
                  setEmail(p.email);
                  const el = document.getElementById('grant-email');
                  el?.scrollIntoView({ block: 'center' });
                  el?.focus();
                }}
              >
                Grant a role…<span className="sr-only"> to {p.name}</span>
              </button>
            </div>
            {p.roles.length === 0 ? (
              <p className="mt-1 text-sm text-ink-soft">No course role.</p>
            ) : (
              <ul className="mt-1 flex flex-wrap gap-2 text-sm">
                {p.roles.map((m) => (
                  <li
                    key={m.membershipId}
                    className="inline-flex items-center gap-2 rounded border border-rule bg-paper px-2 py-0.5"
                    data-role={`${m.course}:${m.role}`}
                  >
                    <span>
                      {ROLE_NAMES[m.role as keyof typeof ROLE_NAMES] ?? m.role}, {m.course}
                      {m.cohort ? `, ${m.cohort}` : ''}
                    </span>
                    <button type="button" className="text-danger underline" onClick={() => remove(p, m)}>
                      Remove
                      <span className="sr-only">
                        {' '}
                        {p.name} as {m.role} in {m.course}
                      </span>
                    </button>
                  </li>
                ))}
              </ul>
            )}
          </li>
        ))}
        {people.length === 0 && <li className="py-3 text-ink-soft">Nobody matches.</li>}
      </ul>
    </div>
  );
}
