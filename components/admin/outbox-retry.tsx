'use client';
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { api } from '@/lib/api-client';

export function RetryButton({ id, label }: { id: number; label: string }) {
  const router = useRouter();
  const [state, setState] = useState<string>('');
  return (
    <span className="inline-flex flex-wrap items-center gap-2">
      <button
        type="button"
        className="btn-quiet"
        disabled={state === 'busy'}
        onClick={async () => {
          setState('busy');
          const r = await api.post(`/api/admin/outbox/${id}/retry`, {});
          setState(r.ok ? 'Queued to send now.' : r.error.message);
          router.refresh();
        }}
      >
        Retry<span className="sr-only"> {label}</span>
      </button>
      <span role="status" className="text-xs text-ink-soft">
        {state === 'busy' ? '' : state}
      </span>
    </span>
  );
}
