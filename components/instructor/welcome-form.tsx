'use client';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { welcomeSchema } from '@/lib/schemas/instructor';
import { api } from '@/lib/api-client';
import { Field } from '@/components/ui/field';

type Input = z.input<typeof welcomeSchema>;

export function WelcomeForm({ token, email }: { token: string; email: string }) {
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState(false);
  const { register, handleSubmit, formState } = useForm<Input>({ resolver: zodResolver(welcomeSchema), defaultValues: { token } });
  async function onSubmit(values: Input) {
    setError(null);
    const r = await api.post('/api/invitations/accept', values);
    if (!r.ok) return setError(r.error.message);
    setDone(true);
  }
  if (done) {
    return (
      <p role="status" className="text-verdict-within">
        ✓ Your password is set. <a href="/signin">Sign in</a> with {email}.
      </p>
    );
  }
  return (
    <form onSubmit={handleSubmit(onSubmit)} noValidate className="space-y-4">
      {error && (
        <p role="alert" className="rounded border border-danger bg-danger-soft px-3 py-2 text-sm text-danger">
          {error}
        </p>
      )}
      <input type="hidden" {...register('token')} />
      <input type="hidden" autoComplete="username" value={email} readOnly />
      <div>
        <label htmlFor="new-password" className="label">
          New password
        </label>
        <input
          id="new-password"
          type="password"
          autoComplete="new-password"
          className="field"
          aria-describedby="new-password-hint"
          {...register('password')}
        />
        <p id="new-password-hint" className="hint">
          At least 12 characters, with at least 4 different characters, and not a commonly used password.
        </p>
      </div>
      <Field id="confirm-password" label="The same password again" error={formState.errors.confirm?.message}>
        <input type="password" autoComplete="new-password" className="field" {...register('confirm')} />
      </Field>
      <button type="submit" className="btn w-full justify-center" disabled={formState.isSubmitting}>
        Set password
      </button>
    </form>
  );
}
