import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { accountUpdateSchema, passwordChangeSchema, type MeUser, type PasswordChangeInput } from '#shared/schemas/auth.ts';
import { api, ApiError } from '../../lib/api.ts';
import { authQueries, useMe } from '../auth/queries.ts';

const profileSchema = accountUpdateSchema.required();
type ProfileInput = z.infer<typeof profileSchema>;

export function AccountPage() {
  const me = useMe();
  const queryClient = useQueryClient();
  const [saved, setSaved] = useState<string | null>(null);
  const profile = useForm<ProfileInput>({ resolver: zodResolver(profileSchema), values: { name: me.name, unitSystem: me.unitSystem } });
  const password = useForm<PasswordChangeInput>({ resolver: zodResolver(passwordChangeSchema) });

  const saveProfile = useMutation({
    mutationFn: (input: ProfileInput) => api.patch<{ user: MeUser }>('/api/me', input),
    onSuccess: ({ user }) => {
      queryClient.setQueryData(authQueries.me().queryKey, user);
      setSaved('Profile saved');
    },
  });
  const changePassword = useMutation({
    mutationFn: (input: PasswordChangeInput) => api.post<void>('/api/me/password', input),
    onSuccess: () => {
      password.reset();
      setSaved('Password changed; your other devices are signed out');
    },
    onError: (err) => {
      if (err instanceof ApiError) for (const i of err.issues) password.setError(i.path as keyof PasswordChangeInput, { message: i.message });
    },
  });

  return (
    <div className="mx-auto max-w-xl space-y-6">
      <h1 className="page-title">Account</h1>
      {saved && <p role="status" className="rounded-lg bg-green-50 p-3 text-sm font-medium text-go">{saved}</p>}
      <form className="card space-y-4" onSubmit={profile.handleSubmit((v) => saveProfile.mutate(v))} aria-label="Profile">
        <div>
          <label className="field-label" htmlFor="name">Name</label>
          <input id="name" className="field-input" {...profile.register('name')} />
          {profile.formState.errors.name && <p className="field-error">{profile.formState.errors.name.message}</p>}
        </div>
        <fieldset>
          <legend className="field-label">Units</legend>
          <div className="flex gap-3">
            <label className="btn-ghost cursor-pointer">
              <input type="radio" value="metric" {...profile.register('unitSystem')} /> Metric (m, mm, °C)
            </label>
            <label className="btn-ghost cursor-pointer">
              <input type="radio" value="us" {...profile.register('unitSystem')} /> US customary (ft, in, °F)
            </label>
          </div>
        </fieldset>
        <p className="text-sm text-ink-700">E-mail: {me.email}</p>
        <button className="btn-primary" type="submit" disabled={saveProfile.isPending}>Save profile</button>
      </form>
      <form className="card space-y-4" onSubmit={password.handleSubmit((v) => changePassword.mutate(v))} aria-label="Change password">
        <h2 className="text-lg font-bold">Change password</h2>
        <div>
          <label className="field-label" htmlFor="currentPassword">Current password</label>
          <input id="currentPassword" type="password" autoComplete="current-password" className="field-input" {...password.register('currentPassword')} />
          {password.formState.errors.currentPassword && <p className="field-error">{password.formState.errors.currentPassword.message}</p>}
        </div>
        <div>
          <label className="field-label" htmlFor="newPassword">New password</label>
          <input id="newPassword" type="password" autoComplete="new-password" className="field-input" {...password.register('newPassword')} />
          {password.formState.errors.newPassword && <p className="field-error">{password.formState.errors.newPassword.message}</p>}
        </div>
        <button className="btn-primary" type="submit" disabled={changePassword.isPending}>Change password</button>
      </form>
    </div>
  );
}
