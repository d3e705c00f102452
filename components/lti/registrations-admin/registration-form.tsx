'use client';
/** The form that registers a learning platform or edits a registration, and the state it keeps. */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { api } from '@/lib/api-client';
import type { RegistrationView } from '@/lib/lti/admin';
import { Status, type Message } from './shared';

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
type FieldName = keyof typeof EMPTY;

/** The values typed, which registration they edit (none: a new one), the answer's field errors and the status line. */
export function useRegistrationForm() {
  const router = useRouter();
  const [form, setForm] = useState(EMPTY);
  const [editing, setEditing] = useState<number | null>(null);
  const [msg, setMsg] = useState<Message>(null);
  const [fields, setFields] = useState<Record<string, string[]>>({});

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
  const cancel = () => {
    setEditing(null);
    setForm(EMPTY);
  };
  const setValue = (key: FieldName, value: string) => setForm({ ...form, [key]: value });
  return { form, editing, msg, setMsg, fields, edit, save, cancel, setValue };
}

export type RegistrationFormState = ReturnType<typeof useRegistrationForm>;

export function RegistrationForm({ state }: { state: RegistrationFormState }) {
  const { editing, msg, save, cancel } = state;
  const field = (key: FieldName, label: string, hint?: string, multiline = false) => (
    <RegistrationField name={key} label={label} hint={hint} multiline={multiline} state={state} />
  );
  return (
    <section aria-labelledby="register-heading" className="card">
      <h2 id="register-heading" className="mb-1">
        {editing ? 'Edit the registration' : 'Register a learning platform'}
      </h2>
      <p className="hint mb-3">The values the platform’s administrator gives you when they register Oscillab. Addresses must be https.</p>
      <div className="grid gap-3 md:grid-cols-2">
        {field('name', 'Name (for this page)')}
        {field('issuer', 'Issuer', 'Exactly as the platform writes it in its tokens (iss).')}
        {field('clientId', 'Client id')}
        {field('deploymentIds', 'Deployment id(s)', 'One per line; launches naming any other deployment are refused.', true)}
        {field('authLoginUrl', 'Platform OIDC login (authorisation) URL')}
        {field('authTokenUrl', 'Platform token URL')}
        {field('keySetUrl', 'Platform public key set (JWKS) URL')}
        {field(
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
          <button type="button" className="btn-quiet" onClick={cancel}>
            Cancel
          </button>
        )}
      </div>
      <Status message={msg} />
    </section>
  );
}

/** One labelled field, its hint (tied by aria-describedby) and the errors the server named for it. */
function RegistrationField({
  name: key,
  label,
  hint,
  multiline,
  state,
}: {
  name: FieldName;
  label: string;
  hint?: string;
  multiline: boolean;
  state: RegistrationFormState;
}) {
  const common = {
    id: `reg-${key}`,
    className: 'field',
    value: state.form[key],
    onChange: (e: React.ChangeEvent<HTMLInputElement | HTMLTextAreaElement>) => state.setValue(key, e.target.value),
    'aria-describedby': hint ? `reg-${key}-hint` : undefined,
  };
  return (
    <div>
      <label htmlFor={`reg-${key}`} className="label">
        {label}
      </label>
      {multiline ? <textarea {...common} rows={2} /> : <input {...common} />}
      {hint && (
        <p id={`reg-${key}-hint`} className="hint">
          {hint}
        </p>
      )}
      {state.fields[key]?.map((f) => (
        <p key={f} className="error-text">
          {f}
        </p>
      ))}
    </div>
  );
}
