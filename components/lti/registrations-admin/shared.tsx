/** What the parts of the learning-platform administration share: the rows the page passes in, and the status line. */
export type Key = { kid: string; status: string; createdAt: string; retiredAt: string | null; published: boolean };
export type Course = { id: number; code: string; title: string };
export type Cohort = { id: number; courseId: number; name: string };
export type Message = { ok: boolean; text: string } | null;

export function Status({ message }: { message: Message }) {
  return (
    <p aria-live="polite" className={message?.ok ? 'mt-2 text-sm text-verdict-within' : 'error-text'}>
      {message ? `${message.ok ? '✓' : '✗'} ${message.text}` : ''}
    </p>
  );
}
