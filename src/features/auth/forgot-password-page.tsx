import { useState } from 'react';
import { Link } from 'react-router';
import { requestPasswordResetSchema } from '#shared/schemas/accounts.ts';
import { api, ApiError } from '../../lib/api.ts';
import { PublicCard } from './accept-invitation-page.tsx';

export function ForgotPasswordPage() {
  const [email, setEmail] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [sent, setSent] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const submit = async (e: React.FormEvent) => {
    e.preventDefault();
    const parsed = requestPasswordResetSchema.safeParse({ email });
    if (!parsed.success) return setError(parsed.error.issues[0].message);
    setError(null);
    setBusy(true);
    try {
      const res = await api.post<{ message: string }>('/api/auth/request-password-reset', parsed.data);
      setSent(res.message);
    } catch (err) {
      setError(err instanceof ApiError ? err.message : 'Could not reach the server; check your connection');
    } finally {
      setBusy(false);
    }
  };
  return (
    <PublicCard title="Forgot your password?">
      {sent ? (
        <p role="status" className="mb-4">{sent} The link works for one hour.</p>
      ) : (
        <form onSubmit={submit} noValidate className="space-y-4" aria-label="Ask for a reset link">
          <p className="text-ink-800">Enter the e-mail of your account; we send a link to choose a new password.</p>
          <div>
            <label htmlFor="email" className="field-label">E-mail</label>
            <input id="email" type="email" autoComplete="username" className="field-input" value={email} onChange={(e) => setEmail(e.target.value)} aria-invalid={!!error} />
            {error && <p className="field-error" role="alert">{error}</p>}
          </div>
          <button type="submit" className="btn-primary w-full" disabled={busy}>{busy ? 'Sending…' : 'Send the link'}</button>
        </form>
      )}
      <p className="mt-4 text-sm"><Link to="/sign-in" className="underline">Back to sign-in</Link></p>
    </PublicCard>
  );
}
