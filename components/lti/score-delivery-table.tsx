'use client';
import { useState } from 'react';
import { api } from '@/lib/api-client';
import type { ScoreDeliveriesAnswer, ScoreDelivery } from '@/lib/lti/scores';
import { Badge, DELIVERY } from './platform-course';

export function ScoreDeliveryTable({ submissionId, initial }: { submissionId: number; initial: ScoreDelivery[] }) {
  const [rows, setRows] = useState(initial);
  const [msg, setMsg] = useState<string | null>(null);
  const reload = async () => {
    const r = await api.get<ScoreDeliveriesAnswer>(`/api/lti/submissions/${submissionId}/scores`);
    if (r.ok) setRows(r.data.deliveries);
  };
  const resend = async (id: number) => {
    const r = await api.post(`/api/lti/scores/${id}/resend`);
    setMsg(r.ok ? '✓ Queued again.' : `✗ ${r.error.message}`);
    await reload();
  };
  return (
    <section aria-labelledby="score-delivery-heading" className="card mb-6">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="score-delivery-heading" className="mb-2">
          Learning-platform gradebook
        </h2>
        <button type="button" className="btn-quiet" onClick={reload}>
          Refresh
        </button>
      </div>
      {rows.length === 0 ? (
        <p className="text-ink-soft">
          No score has been queued for this submission (it goes out on release, for a student known to the learning platform).
        </p>
      ) : (
        <div className="overflow-x-auto">
          <table className="data-table">
            <thead>
              <tr>
                <th scope="col">Platform course</th>
                <th scope="col" className="num">
                  Score
                </th>
                <th scope="col">State</th>
                <th scope="col" className="num">
                  Attempts
                </th>
                <th scope="col">Last error</th>
                <th scope="col">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {rows.map((d) => (
                <tr key={d.id} data-score-delivery={d.status}>
                  <td>{d.platformCourse}</td>
                  <td className="num">
                    {d.scoreGiven} / {d.scoreMaximum}
                  </td>
                  <td>
                    <Badge kind={DELIVERY[d.status] ?? DELIVERY.queued} />{' '}
                    <span className="text-xs">
                      {d.sentAt ? new Date(d.sentAt).toLocaleString('en-GB', { timeStyle: 'short', dateStyle: 'short' }) : ''}
                    </span>
                  </td>
                  <td className="num">{d.attempts}</td>
                  <td className="text-xs">{d.lastError ?? '—'}</td>
                  <td>
                    {(d.status === 'sent' || d.status === 'failed') && (
                      <button type="button" className="btn-quiet" onClick={() => resend(d.id)}>
                        Resend
                      </button>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <p aria-live="polite" className="mt-2 text-sm">
        {msg ?? ''}
      </p>
    </section>
  );
}
