'use client';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { signIn } from 'next-auth/react';
import { signInSchema, SIGN_IN_ERRORS, type SignInInput } from '@/lib/schemas/auth';

export function SignInForm({ initialError, next = '/' }: { initialError?: string; next?: string }) {
  const [error, setError] = useState(initialError);
  const { register, handleSubmit, formState } = useForm<SignInInput>({ resolver: zodResolver(signInSchema) });

  async function onSubmit(values: SignInInput) {
    setError(undefined);
    const result = await signIn('credentials', { ...values, redirect: false });
    if (!result || result.error) {
      setError(SIGN_IN_ERRORS[result?.error ?? ''] ?? SIGN_IN_ERRORS.CredentialsSignin);
      return;
    }
    window.location.assign(next);
  }

  return (
    <form onSubmit={handleSubmit(onSubmit)} noValidate className="space-y-4">
      {error && (
        <p role="alert" className="rounded border border-danger bg-danger-soft px-3 py-2 text-sm text-danger">
          {error}
        </p>
      )}
      <div>
        <label htmlFor="email" className="label">E-mail</label>
        <input id="email" type="email" autoComplete="username" className="field" {...register('email')} aria-invalid={!!formState.errors.email} />
        {formState.errors.email && <p className="error-text">{formState.errors.email.message}</p>}
      </div>
      <div>
        <label htmlFor="password" className="label">Password</label>
        <input id="password" type="password" autoComplete="current-password" className="field" {...register('password')} aria-invalid={!!formState.errors.password} />
        {formState.errors.password && <p className="error-text">{formState.errors.password.message}</p>}
      </div>
      <button type="submit" className="btn w-full justify-center" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Signing in…' : 'Sign in'}
      </button>
    </form>
  );
}
