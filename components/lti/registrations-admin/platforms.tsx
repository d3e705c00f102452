'use client';
/** The registered learning platforms, each with its addresses, its switch, and its connected courses. */
import { useRouter } from 'next/navigation';
import { api } from '@/lib/api-client';
import type { RegistrationView } from '@/lib/lti/admin';
import { Contexts } from './contexts';
import type { Cohort, Course, Message } from './shared';

type Props = {
  registrations: RegistrationView[];
  courses: Course[];
  cohorts: Cohort[];
  onEdit: (r: RegistrationView) => void;
  /** Removing or switching a registration reports under the registration form, where its other messages appear. */
  onMessage: (m: Message) => void;
};

export function RegisteredPlatforms({ registrations, courses, cohorts, onEdit, onMessage }: Props) {
  const router = useRouter();
  const remove = async (r: RegistrationView) => {
    if (
      !window.confirm(`Remove the registration “${r.name}”? Its course connections and queued scores go with it; accounts and work stay.`)
    )
      return;
    const res = await api.delete(`/api/lti/registrations/${r.id}`);
    onMessage(res.ok ? { ok: true, text: 'Registration removed.' } : { ok: false, text: res.error.message });
    router.refresh();
  };
  const toggle = async (r: RegistrationView) => {
    const res = await api.patch(`/api/lti/registrations/${r.id}`, { active: !r.active });
    onMessage(
      res.ok
        ? { ok: true, text: r.active ? 'Launches from this platform are now refused.' : 'Launches from this platform are accepted again.' }
        : { ok: false, text: res.error.message },
    );
    router.refresh();
  };
  return (
    <section aria-labelledby="registrations-heading" className="card">
      <h2 id="registrations-heading" className="mb-3">
        Registered platforms
      </h2>
      {registrations.length === 0 && <p className="text-ink-soft">No learning platform is registered yet.</p>}
      <ul className="space-y-5">
        {registrations.map((r) => (
          <li key={r.id} className="border-t border-rule pt-3 first:border-t-0 first:pt-0" data-registration={r.clientId}>
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <h3>
                {r.name} <span className="text-sm font-normal">{r.active ? '● accepting launches' : '○ switched off'}</span>
              </h3>
              <div className="flex flex-wrap gap-2">
                <button type="button" className="btn-quiet" onClick={() => onEdit(r)}>
                  Edit
                </button>
                <button type="button" className="btn-quiet" onClick={() => toggle(r)}>
                  {r.active ? 'Switch off' : 'Switch on'}
                </button>
                <button type="button" className="btn-quiet" onClick={() => remove(r)}>
                  Remove
                </button>
              </div>
            </div>
            <RegistrationDetails registration={r} />
            <Contexts registration={r} courses={courses} cohorts={cohorts} />
          </li>
        ))}
      </ul>
    </section>
  );
}

function RegistrationDetails({ registration: r }: { registration: RegistrationView }) {
  return (
    <dl className="mt-1 grid gap-x-4 text-sm md:grid-cols-[10rem_1fr]">
      <dt className="text-ink-soft">Issuer</dt>
      <dd className="break-all">{r.issuer}</dd>
      <dt className="text-ink-soft">Client id</dt>
      <dd className="break-all">{r.clientId}</dd>
      <dt className="text-ink-soft">Deployments</dt>
      <dd className="break-all">{r.deploymentIds.join(', ')}</dd>
      <dt className="text-ink-soft">OIDC login URL</dt>
      <dd className="break-all">{r.authLoginUrl}</dd>
      <dt className="text-ink-soft">Token URL</dt>
      <dd className="break-all">{r.authTokenUrl}</dd>
      <dt className="text-ink-soft">Key set URL</dt>
      <dd className="break-all">{r.keySetUrl}</dd>
    </dl>
  );
}
