'use client';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { api } from '@/lib/api-client';
import type { PasswordResetAnswer } from '@/lib/auth/reset';
import { resetRequestSchema, type ResetRequestInput } from '@/lib/schemas/auth';

/** "Forgot your password?": sends the address and shows whatever the server says, which is the same for every address. */
export function ResetRequestForm() {
  const [error, setError] = useState<string | null>(null);
  const [sent, setSent] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm<ResetRequestInput>({ resolver: zodResolver(resetRequestSchema) });

  async function onSubmit(values: ResetRequestInput) {
    setError(null);
    setSent(null);
    const r = await api.post<PasswordResetAnswer>('/api/password-reset', values);
    if (!r.ok) return setError(r.error.message);
    setSent(r.data.message ?? '');
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
        <label htmlFor="reset-email" className="label">
          E-mail
        </label>
        <input
          id="reset-email"
          type="email"
          autoComplete="username"
          className="field"
          aria-invalid={!!formState.errors.email}
          aria-describedby="reset-email-hint"
          {...register('email')}
        />
        {formState.errors.email && <p className="error-text">{formState.errors.email.message}</p>}
        <p id="reset-email-hint" className="hint">
          The address your department registered for you.
        </p>
      </div>
      <button type="submit" className="btn w-full justify-center" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Sending…' : 'Send me a reset link'}
      </button>
    </form>
  );
}
