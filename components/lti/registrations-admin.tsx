'use client';
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { api } from '@/lib/api-client';
import type { KeyRotated } from '@/lib/lti/keys';
import type { RegistrationView } from '@/lib/lti/admin';

type Key = { kid: string; status: string; createdAt: string; retiredAt: string | null; published: boolean };
type Course = { id: number; code: string; title: string };
type Cohort = { id: number; courseId: number; name: string };
type Message = { ok: boolean; text: string } | null;

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short' }) : '—');

function Status({ message }: { message: Message }) {
  return (
    <p aria-live="polite" className={message?.ok ? 'mt-2 text-sm text-verdict-within' : 'error-text'}>
      {message ? `${message.ok ? '✓' : '✗'} ${message.text}` : ''}
    </p>
  );
}

const EMPTY = {
  name: '',
  issuer: '',
  clientId: '',
  deploymentIds: '',
  authLoginUrl: '',
  authTokenUrl: '',
  keySetUrl: '',
  tokenAudience: '',
};

/** Registrations of learning platforms, their course connections, and Oscillab's own keys. */
export function RegistrationsAdmin({
  registrations,
  keys,
  courses,
  cohorts,
}: {
  registrations: RegistrationView[];
  keys: Key[];
  courses: Course[];
  cohorts: Cohort[];
}) {
  const router = useRouter();
  const [form, setForm] = useState(EMPTY);
  const [editing, setEditing] = useState<number | null>(null);
  const [msg, setMsg] = useState<Message>(null);
  const [fields, setFields] = useState<Record<string, string[]>>({});
  const [keyMsg, setKeyMsg] = useState<Message>(null);

  const edit = (r: RegistrationView) => {
    setEditing(r.id);
    setForm({
      name: r.name,
      issuer: r.issuer,
      clientId: r.clientId,
      deploymentIds: r.deploymentIds.join('\n'),
      authLoginUrl: r.authLoginUrl,
      authTokenUrl: r.authTokenUrl,
      keySetUrl: r.keySetUrl,
      tokenAudience: r.tokenAudience ?? '',
    });
    setMsg(null);
  };
  const save = async () => {
    const body = {
      ...form,
      deploymentIds: form.deploymentIds.split(/[\s,]+/).filter(Boolean),
      tokenAudience: form.tokenAudience || undefined,
    };
    const r = editing ? await api.patch(`/api/lti/registrations/${editing}`, body) : await api.post('/api/lti/registrations', body);
    setFields(r.ok ? {} : r.error.fields);
    setMsg(
      r.ok ? { ok: true, text: editing ? 'Registration saved.' : 'Learning platform registered.' } : { ok: false, text: r.error.message },
    );
    if (r.ok) {
      setForm(EMPTY);
      setEditing(null);
      router.refresh();
    }
  };
  const remove = async (r: RegistrationView) => {
    if (
      !window.confirm(`Remove the registration “${r.name}”? Its course connections and queued scores go with it; accounts and work stay.`)
    )
      return;
    const res = await api.delete(`/api/lti/registrations/${r.id}`);
    setMsg(res.ok ? { ok: true, text: 'Registration removed.' } : { ok: false, text: res.error.message });
    router.refresh();
  };
  const toggle = async (r: RegistrationView) => {
    const res = await api.patch(`/api/lti/registrations/${r.id}`, { active: !r.active });
    setMsg(
      res.ok
        ? { ok: true, text: r.active ? 'Launches from this platform are now refused.' : 'Launches from this platform are accepted again.' }
        : { ok: false, text: res.error.message },
    );
    router.refresh();
  };
  const rotate = async () => {
    if (!window.confirm('Make a new signing key? The old one stays published for 24 hours so nothing in flight breaks.')) return;
    const res = await api.post<KeyRotated>('/api/lti/keys');
    setKeyMsg(
      res.ok ? { ok: true, text: `New key ${res.data.kid.slice(0, 12)}… signs from now on.` } : { ok: false, text: res.error.message },
    );
    router.refresh();
  };

  const input = (key: keyof typeof EMPTY, label: string, hint?: string, multiline = false) => (
    <div>
      <label htmlFor={`reg-${key}`} className="label">
        {label}
      </label>
      {multiline ? (
        <textarea
          id={`reg-${key}`}
          className="field"
          rows={2}
          value={form[key]}
          onChange={(e) => setForm({ ...form, [key]: e.target.value })}
          aria-describedby={hint ? `reg-${key}-hint` : undefined}
        />
      ) : (
        <input
          id={`reg-${key}`}
          className="field"
          value={form[key]}
          onChange={(e) => setForm({ ...form, [key]: e.target.value })}
          aria-describedby={hint ? `reg-${key}-hint` : undefined}
        />
      )}
      {hint && (
        <p id={`reg-${key}-hint`} className="hint">
          {hint}
        </p>
      )}
      {fields[key]?.map((f) => (
        <p key={f} className="error-text">
          {f}
        </p>
      ))}
    </div>
  );

  return (
    <div className="space-y-6">
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
                  <button type="button" className="btn-quiet" onClick={() => edit(r)}>
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
              <Contexts registration={r} courses={courses} cohorts={cohorts} />
            </li>
          ))}
        </ul>
      </section>

      <section aria-labelledby="register-heading" className="card">
        <h2 id="register-heading" className="mb-1">
          {editing ? 'Edit the registration' : 'Register a learning platform'}
        </h2>
        <p className="hint mb-3">The values the platform’s administrator gives you when they register Oscillab. Addresses must be https.</p>
        <div className="grid gap-3 md:grid-cols-2">
          {input('name', 'Name (for this page)')}
          {input('issuer', 'Issuer', 'Exactly as the platform writes it in its tokens (iss).')}
          {input('clientId', 'Client id')}
          {input('deploymentIds', 'Deployment id(s)', 'One per line; launches naming any other deployment are refused.', true)}
          {input('authLoginUrl', 'Platform OIDC login (authorisation) URL')}
          {input('authTokenUrl', 'Platform token URL')}
          {input('keySetUrl', 'Platform public key set (JWKS) URL')}
          {input(
            'tokenAudience',
            'Token audience (optional)',
            'Only if the platform wants another audience than its token URL in Oscillab’s token requests.',
          )}
        </div>
        <div className="mt-3 flex gap-2">
          <button type="button" className="btn" onClick={save}>
            {editing ? 'Save' : 'Register'}
          </button>
          {editing && (
            <button
              type="button"
              className="btn-quiet"
              onClick={() => {
                setEditing(null);
                setForm(EMPTY);
              }}
            >
              Cancel
            </button>
          )}
        </div>
        <Status message={msg} />
      </section>

      <section aria-labelledby="keys-heading" className="card">
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h2 id="keys-heading">Oscillab’s signing keys</h2>
          <button type="button" className="btn-quiet" onClick={rotate}>
            Rotate the key
          </button>
        </div>
        <p className="hint mb-2">
          Oscillab signs its token requests and deep-linking answers with the active key; the platform reads the public half from the key
          set URL above. A retired key stays published for 24 hours.
        </p>
        <div className="overflow-x-auto">
          <table className="data-table">
            <thead>
              <tr>
                <th scope="col">Key id</th>
                <th scope="col">State</th>
                <th scope="col">Made</th>
                <th scope="col">Retired</th>
              </tr>
            </thead>
            <tbody>
              {keys.map((k) => (
                <tr key={k.kid}>
                  <td>
                    <code className="text-xs break-all">{k.kid}</code>
                  </td>
                  <td>{k.status === 'active' ? '● active (signs)' : k.published ? '◐ retired, still published' : '○ retired'}</td>
                  <td>{when(k.createdAt)}</td>
                  <td>{when(k.retiredAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <Status message={keyMsg} />
      </section>
    </div>
  );
}

function Contexts({ registration, courses, cohorts }: { registration: RegistrationView; courses: Course[]; cohorts: Cohort[] }) {
  const router = useRouter();
  const [contextId, setContextId] = useState('');
  const [courseId, setCourseId] = useState('');
  const [cohortId, setCohortId] = useState('');
  const [msg, setMsg] = useState<Message>(null);
  const connect = async () => {
    const r = await api.post('/api/lti/contexts', {
      registrationId: registration.id,
      contextId,
      courseId: Number(courseId),
      defaultCohortId: cohortId ? Number(cohortId) : null,
    });
    setMsg(r.ok ? { ok: true, text: 'Course connected.' } : { ok: false, text: r.error.message });
    if (r.ok) {
      setContextId('');
      router.refresh();
    }
  };
  const disconnect = async (id: number) => {
    if (!window.confirm('Disconnect this course? People, roles and work in Oscillab stay; queued scores for it are dropped.')) return;
    const r = await api.delete(`/api/lti/contexts/${id}`);
    setMsg(r.ok ? { ok: true, text: 'Disconnected.' } : { ok: false, text: r.error.message });
    router.refresh();
  };
  const prefix = `ctx-${registration.id}`;
  return (
    <div className="mt-3">
      <h4 className="text-sm font-bold">Connected courses</h4>
      {registration.contexts.length === 0 ? (
        <p className="text-sm text-ink-soft">None yet. A launch from an unconnected course is refused with a page naming its context id.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="data-table mt-1">
            <thead>
              <tr>
                <th scope="col">Platform course (context id)</th>
                <th scope="col">Oscillab course</th>
                <th scope="col">Services offered</th>
                <th scope="col">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {registration.contexts.map((c) => (
                <tr key={c.id}>
                  <td>
                    {c.title ?? '—'} <code className="text-xs break-all">{c.contextId}</code>
                  </td>
                  <td>
                    <a href={`/courses/${c.courseId}/learning-platform`}>{c.courseCode}</a>
                  </td>
                  <td>
                    {c.services.roster ? '✓ roster' : '– roster'} · {c.services.gradebook ? '✓ gradebook' : '– gradebook'}
                  </td>
                  <td>
                    <button type="button" className="btn-quiet" onClick={() => disconnect(c.id)}>
                      Disconnect
                    </button>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <div className="mt-2 flex flex-wrap items-end gap-2">
        <div>
          <label htmlFor={`${prefix}-id`} className="label">
            Platform context id
          </label>
          <input id={`${prefix}-id`} className="field" value={contextId} onChange={(e) => setContextId(e.target.value)} />
        </div>
        <div>
          <label htmlFor={`${prefix}-course`} className="label">
            Oscillab course
          </label>
          <select
            id={`${prefix}-course`}
            className="field"
            value={courseId}
            onChange={(e) => {
              setCourseId(e.target.value);
              setCohortId('');
            }}
          >
            <option value="">Choose…</option>
            {courses.map((c) => (
              <option key={c.id} value={c.id}>
                {c.code} {c.title}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor={`${prefix}-cohort`} className="label">
            Cohort for its students
          </label>
          <select id={`${prefix}-cohort`} className="field" value={cohortId} onChange={(e) => setCohortId(e.target.value)}>
            <option value="">The course’s only cohort</option>
            {cohorts
              .filter((c) => String(c.courseId) === courseId)
              .map((c) => (
                <option key={c.id} value={c.id}>
                  {c.name}
                </option>
              ))}
          </select>
        </div>
        <button type="button" className="btn-quiet" disabled={!contextId.trim() || !courseId} onClick={connect}>
          Connect
        </button>
      </div>
      <Status message={msg} />
    </div>
  );
}
