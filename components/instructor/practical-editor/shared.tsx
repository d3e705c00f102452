/** What the parts of the practical editor share: the practical as the API answers it, and the status line. */
import type { PracticalDetail } from '@/lib/instructor/practicals';

export type Detail = PracticalDetail;
export type Quantity = Detail['quantities'][number];
export type Cohort = Detail['cohorts'][number];
export type Msg = { ok: boolean; text: string } | null;

export function Status({ message }: { message: Msg }) {
  return (
    <p aria-live="polite" className={message?.ok ? 'mt-2 text-sm text-verdict-within' : 'error-text'}>
      {message ? `${message.ok ? '✓' : '✗'} ${message.text}` : ''}
    </p>
  );
}

export const cohortLabel = (cohorts: Cohort[], id: number | null) => {
  if (id === null) return 'Course default';
  const c = cohorts.find((x) => x.id === id);
  return c ? `${c.name} (${c.term})` : `#${id}`;
};

/** A `datetime-local` value (UTC) from an ISO time. */
export const toLocal = (iso: string) => iso.slice(0, 16);
/** An ISO time from a `datetime-local` value read as UTC. */
export const fromLocal = (v: string) => new Date(`${v}Z`).toISOString();
