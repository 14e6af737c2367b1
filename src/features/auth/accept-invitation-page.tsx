import { useState, type ReactNode } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { homeFor, ROLE_LABELS, type Role } from '#shared/roles.ts';
import { newPasswordSchema, PASSWORD_MIN_LENGTH, type MeUser } from '#shared/schemas/auth.ts';
import { api, ApiError } from '../../lib/api.ts';
import { Logo } from '../../components/logo.tsx';
import { authQueries } from './queries.ts';

/** The frame of the pages a visitor reaches without signing in (invitation, reset). */
export function PublicCard({ title, children }: { title: string; children: ReactNode }) {
  return (
    <main className="flex min-h-full items-center justify-center bg-ink-900 p-6">
      <div className="w-full max-w-md rounded-2xl bg-chalk p-8 shadow-xl">
        <div className="mb-6 flex items-center gap-3">
          <Logo className="h-10 w-10" />
          <div>
            <p className="text-sm font-semibold text-ink-700">Roostline</p>
            <h1 className="text-2xl font-bold">{title}</h1>
          </div>
        </div>
        {children}
      </div>
    </main>
  );
}

/** A new password typed twice; checks length on the device, the common-password list on the server. */
export function NewPasswordForm({ submitLabel, onSubmit }: { submitLabel: string; onSubmit: (password: string) => Promise<void> }) {
  const [password, setPassword] = useState('');
  const [confirm, setConfirm] = useState('');
  const [errors, setErrors] = useState<{ password?: string; confirm?: string; form?: string }>({});
  const [busy, setBusy] = useState(false);
  const submit = async (e: React.FormEvent) => {
    e.preventDefault();
    const parsed = newPasswordSchema.safeParse(password);
    const next: typeof errors = {};
    if (!parsed.success) next.password = parsed.error.issues[0].message;
    if (confirm !== password) next.confirm = 'The two passwords differ';
    setErrors(next);
    if (next.password || next.confirm) return;
    setBusy(true);
    try {
      await onSubmit(password);
    } catch (err) {
      if (err instanceof ApiError) setErrors({ password: err.issueFor('password'), form: err.issueFor('password') ? undefined : err.message });
      else setErrors({ form: 'Could not reach the server; check your connection' });
    } finally {
      setBusy(false);
    }
  };
  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-label="Choose a password">
      <div>
        <label htmlFor="new-password" className="field-label">New password</label>
        <input id="new-password" type="password" autoComplete="new-password" className="field-input" value={password} onChange={(e) => setPassword(e.target.value)} aria-invalid={!!errors.password} aria-describedby="password-hint" />
        <p id="password-hint" className="mt-1 text-sm text-ink-700">At least {PASSWORD_MIN_LENGTH} characters; a phrase of a few words works well. Common passwords are refused.</p>
        {errors.password && <p className="field-error">{errors.password}</p>}
      </div>
      <div>
        <label htmlFor="confirm-password" className="field-label">Repeat the password</label>
        <input id="confirm-password" type="password" autoComplete="new-password" className="field-input" value={confirm} onChange={(e) => setConfirm(e.target.value)} aria-invalid={!!errors.confirm} />
        {errors.confirm && <p className="field-error">{errors.confirm}</p>}
      </div>
      {errors.form && <p role="alert" className="rounded-lg bg-red-50 p-3 text-sm font-medium text-alarm">{errors.form}</p>}
      <button type="submit" className="btn-primary w-full" disabled={busy}>{busy ? 'Saving…' : submitLabel}</button>
    </form>
  );
}

interface InvitationView {
  email: string;
  name: string;
  roles: Role[];
  expiresAt: string;
}

export function AcceptInvitationPage() {
  const [params] = useSearchParams();
  const token = params.get('token') ?? '';
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const invitation = useQuery({
    queryKey: ['invitation', token],
    queryFn: () => api.get<InvitationView>(`/api/auth/invitation?token=${encodeURIComponent(token)}`),
    enabled: !!token,
    retry: false,
    staleTime: Infinity,
  });

  if (!token || invitation.isError) {
    return (
      <PublicCard title="This link does not work">
        <p role="alert" className="mb-4 text-ink-800">
          {invitation.error instanceof ApiError ? invitation.error.message : 'The invitation link is incomplete. Open it from the e-mail again, or ask your admin for a new one.'}
        </p>
        <Link to="/sign-in" className="btn-ghost">Go to sign-in</Link>
      </PublicCard>
    );
  }
  if (!invitation.data) {
    return <PublicCard title="Welcome"><p>Checking your invitation…</p></PublicCard>;
  }
  const inv = invitation.data;
  return (
    <PublicCard title={`Welcome, ${inv.name}`}>
      <p className="mb-4 text-ink-800">
        Choose a password for <strong>{inv.email}</strong> ({inv.roles.map((r) => ROLE_LABELS[r]).join(', ')}). You are signed in straight after.
      </p>
      <NewPasswordForm
        submitLabel="Set password and sign in"
        onSubmit={async (password) => {
          const { user } = await api.post<{ user: MeUser }>('/api/auth/accept-invitation', { token, password });
          queryClient.setQueryData(authQueries.me().queryKey, user);
          navigate(homeFor(user.roles), { replace: true });
        }}
      />
    </PublicCard>
  );
}
