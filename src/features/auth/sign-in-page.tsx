import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useNavigate, useSearchParams } from 'react-router';
import { useQueryClient } from '@tanstack/react-query';
import { signInSchema, type SignInInput } from '#shared/schemas/auth.ts';
import { homeFor } from '#shared/roles.ts';
import { ApiError } from '../../lib/api.ts';
import { authQueries, signIn } from './queries.ts';
import { Logo } from '../../components/logo.tsx';
import { useOnline } from '../../lib/online.ts';

export function SignInPage() {
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const queryClient = useQueryClient();
  const online = useOnline();
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm<SignInInput>({ resolver: zodResolver(signInSchema) });

  const onSubmit = handleSubmit(async (values) => {
    setFormError(null);
    try {
      const { user } = await signIn(values);
      queryClient.setQueryData(authQueries.me().queryKey, user);
      const next = params.get('next');
      navigate(next && next.startsWith('/') && !next.startsWith('//') ? next : homeFor(user.roles), { replace: true });
    } catch (err) {
      setFormError(err instanceof ApiError ? err.message : 'Could not reach the server; check your connection');
    }
  });

  return (
    <main className="flex min-h-full items-center justify-center bg-ink-900 p-6">
      <div className="w-full max-w-md rounded-2xl bg-chalk p-8 shadow-xl">
        <div className="mb-6 flex items-center gap-3">
          <Logo className="h-10 w-10" />
          <div>
            <h1 className="text-2xl font-bold">Roostline</h1>
            <p className="text-sm text-ink-700">Perch-site survey and line inventory</p>
          </div>
        </div>
        {params.get('ended') && !formError && (
          <p role="status" className="mb-4 rounded-lg border-2 border-brass-500 bg-brass-100 p-3 text-sm font-semibold" data-testid="session-ended">
            Your session ended — sign in again. You will come back to the page you were on.
          </p>
        )}
        {!online && (
          <p role="status" className="mb-4 rounded-lg border-2 border-brass-500 bg-brass-100 p-3 text-sm" data-testid="offline-sign-in">
            No connection. Signing in needs the network once; after that Roostline keeps working in the field without it.
          </p>
        )}
        <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label="Sign in">
          <div>
            <label htmlFor="email" className="field-label">E-mail</label>
            <input id="email" type="email" autoComplete="username" className="field-input" {...register('email')} aria-invalid={!!formState.errors.email} />
            {formState.errors.email && <p className="field-error">{formState.errors.email.message}</p>}
          </div>
          <div>
            <label htmlFor="password" className="field-label">Password</label>
            <input id="password" type="password" autoComplete="current-password" className="field-input" {...register('password')} aria-invalid={!!formState.errors.password} />
            {formState.errors.password && <p className="field-error">{formState.errors.password.message}</p>}
          </div>
          {formError && (
            <p role="alert" className="rounded-lg bg-red-50 p-3 text-sm font-medium text-alarm">
              {formError}
            </p>
          )}
          <button type="submit" className="btn-primary w-full" disabled={formState.isSubmitting}>
            {formState.isSubmitting ? 'Signing in…' : 'Sign in'}
          </button>
        </form>
        <p className="mt-4 text-center text-sm"><a href="/forgot-password" className="font-semibold text-ink-700 underline">Forgot password?</a></p>
      </div>
    </main>
  );
}
