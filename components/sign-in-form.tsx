'use client';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { signIn } from 'next-auth/react';
import { signInSchema, SIGN_IN_ERRORS, type SignInInput } from '@/lib/schemas/auth';
import { Field } from '@/components/ui/field';

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
      <Field id="email" label="E-mail" error={formState.errors.email?.message}>
        <input type="email" autoComplete="username" className="field" {...register('email')} aria-invalid={!!formState.errors.email} />
      </Field>
      <Field id="password" label="Password" error={formState.errors.password?.message}>
        <input
          type="password"
          autoComplete="current-password"
          className="field"
          {...register('password')}
          aria-invalid={!!formState.errors.password}
        />
      </Field>
      <button type="submit" className="btn w-full justify-center" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Signing in…' : 'Sign in'}
      </button>
    </form>
  );
}
