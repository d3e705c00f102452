'use client';
/** Oscillab's own signing keys: which signs now, which are retired but still published, and rotating to a new one. */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { api } from '@/lib/api-client';
import type { KeyRotated } from '@/lib/lti/keys';
import { Status, type Key, type Message } from './shared';

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short' }) : '—');

export function SigningKeys({ keys }: { keys: Key[] }) {
  const router = useRouter();
  const [keyMsg, setKeyMsg] = useState<Message>(null);
  const rotate = async () => {
    if (!window.confirm('Make a new signing key? The old one stays published for 24 hours so nothing in flight breaks.')) return;
    const res = await api.post<KeyRotated>('/api/lti/keys');
    setKeyMsg(
      res.ok ? { ok: true, text: `New key ${res.data.kid.slice(0, 12)}… signs from now on.` } : { ok: false, text: res.error.message },
    );
    router.refresh();
  };
  return (
    <section aria-labelledby="keys-heading" className="card">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="keys-heading">Oscillab’s signing keys</h2>
        <button type="button" className="btn-quiet" onClick={rotate}>
          Rotate the key
        </button>
      </div>
      <p className="hint mb-2">
        Oscillab signs its token requests and deep-linking answers with the active key; the platform reads the public half from the key set
        URL above. A retired key stays published for 24 hours.
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
  );
}
