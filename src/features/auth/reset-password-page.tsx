import { useState } from 'react';
import { Link, useSearchParams } from 'react-router';
import { api } from '../../lib/api.ts';
import { NewPasswordForm, PublicCard } from './accept-invitation-page.tsx';

export function ResetPasswordPage() {
  const [params] = useSearchParams();
  const token = params.get('token') ?? '';
  const [done, setDone] = useState(false);
  if (!token) {
    return (
      <PublicCard title="This link does not work">
        <p role="alert" className="mb-4">The reset link is incomplete. Open it from the e-mail again, or ask for a new one.</p>
        <Link to="/forgot-password" className="btn-ghost">Ask for a new link</Link>
      </PublicCard>
    );
  }
  if (done) {
    return (
      <PublicCard title="Password changed">
        <p role="status" className="mb-4">Your password is changed and every device that was signed in is signed out. Sign in with the new password.</p>
        <Link to="/sign-in" className="btn-primary w-full">Sign in</Link>
      </PublicCard>
    );
  }
  return (
    <PublicCard title="Choose a new password">
      <NewPasswordForm
        submitLabel="Change password"
        onSubmit={async (password) => {
          await api.post('/api/auth/reset-password', { token, password });
          setDone(true);
        }}
      />
      <p className="mt-4 text-sm"><Link to="/forgot-password" className="underline">The link expired? Ask for a new one</Link></p>
    </PublicCard>
  );
}
