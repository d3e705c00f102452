'use client';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { resetRequestSchema, type ResetRequestInput } from '@/lib/schemas/auth';

/** "Forgot your password?": sends the address and shows whatever the server says, which is the same for every address. */
export function ResetRequestForm() {
  const [error, setError] = useState<string | null>(null);
  const [sent, setSent] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm<ResetRequestInput>({ resolver: zodResolver(resetRequestSchema) });

  async function onSubmit(values: ResetRequestInput) {
    setError(null);
    setSent(null);
    let data: { message?: string; error?: string } = {};
    let ok = false;
    try {
      const res = await fetch('/api/password-reset', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(values) });
      ok = res.ok;
      data = await res.json().catch(() => ({ error: `The server answered ${res.status}.` }));
    } catch {
      data = { error: 'The request did not reach Oscillab. Check your connection and try again.' };
    }
    if (!ok) return setError(data.error ?? 'The request was not accepted.');
    setSent(data.message ?? '');
  }

  return (
    <form onSubmit={handleSubmit(onSubmit)} noValidate className="space-y-4">
      <div aria-live="polite">
        {sent && (
          <p role="status" data-testid="reset-sent" className="rounded border border-rule bg-paper-sunk px-3 py-2 text-sm text-ink">
            ✓ {sent}
          </p>
        )}
        {error && (
          <p role="alert" className="rounded border border-danger bg-danger-soft px-3 py-2 text-sm text-danger">
            {error}
          </p>
        )}
      </div>
      <div>
        <label htmlFor="reset-email" className="label">E-mail</label>
        <input id="reset-email" type="email" autoComplete="username" className="field" aria-invalid={!!formState.errors.email} aria-describedby="reset-email-hint" {...register('email')} />
        {formState.errors.email && <p className="error-text">{formState.errors.email.message}</p>}
        <p id="reset-email-hint" className="hint">The address your department registered for you.</p>
      </div>
      <button type="submit" className="btn w-full justify-center" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Sending…' : 'Send me a reset link'}
      </button>
    </form>
  );
}
