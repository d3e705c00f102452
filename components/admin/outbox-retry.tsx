'use client';
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { send } from '@/components/marking/fetcher';

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
          const r = await send(`/api/admin/outbox/${id}/retry`, 'POST', {});
          setState(r.ok ? 'Queued to send now.' : (r.body.error ?? 'Not retried.'));
          router.refresh();
        }}
      >
        Retry<span className="sr-only"> {label}</span>
      </button>
      <span role="status" className="text-xs text-ink-soft">{state === 'busy' ? '' : state}</span>
    </span>
  );
}
