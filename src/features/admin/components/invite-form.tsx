import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { ROLES, ROLE_LABELS } from '#shared/roles.ts';
import { invitationCreateSchema, type InvitationCreateInput } from '#shared/schemas/accounts.ts';
import { ApiError } from '../../../lib/api.ts';
import { adminApi } from '../api.ts';
import { adminQueries } from '../queries.ts';

export function InviteForm() {
  const queryClient = useQueryClient();
  const crews = useQuery(adminQueries.crews());
  const [notice, setNotice] = useState<{ kind: 'ok' | 'warn' | 'error'; text: string } | null>(null);
  const { register, handleSubmit, formState, reset, setError } = useForm<InvitationCreateInput>({
    resolver: zodResolver(invitationCreateSchema),
    defaultValues: { email: '', name: '', roles: ['surveyor'], crewId: null },
  });
  const invite = useMutation({ mutationFn: adminApi.invite });

  const onSubmit = handleSubmit(async (values) => {
    setNotice(null);
    try {
      const inv = await invite.mutateAsync(values);
      reset();
      setNotice(
        inv.mailSent === false
          ? { kind: 'warn', text: `Invitation saved, but the mail server refused the e-mail to ${inv.email}. Try “Send again” below.` }
          : { kind: 'ok', text: `Invitation sent to ${inv.email}.` },
      );
      await queryClient.invalidateQueries({ queryKey: adminQueries.all });
    } catch (err) {
      if (err instanceof ApiError) {
        for (const field of ['email', 'name', 'roles', 'crewId'] as const) {
          const msg = err.issueFor(field);
          if (msg) setError(field, { message: msg });
        }
        setNotice({ kind: 'error', text: err.message });
      } else setNotice({ kind: 'error', text: 'Could not reach the server; check your connection' });
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate aria-label="Invite a person" className="card space-y-3">
      <h2 className="text-lg font-bold">Invite a person</h2>
      <p className="text-sm text-ink-700">They get an e-mail with a one-time link (valid 72 hours) to choose a password.</p>
      <div className="grid gap-3 sm:grid-cols-2">
        <div>
          <label htmlFor="invite-name" className="field-label">Name</label>
          <input id="invite-name" className="field-input" autoComplete="off" {...register('name')} aria-invalid={!!formState.errors.name} />
          {formState.errors.name && <p className="field-error">{formState.errors.name.message}</p>}
        </div>
        <div>
          <label htmlFor="invite-email" className="field-label">E-mail</label>
          <input id="invite-email" type="email" className="field-input" autoComplete="off" {...register('email')} aria-invalid={!!formState.errors.email} />
          {formState.errors.email && <p className="field-error">{formState.errors.email.message}</p>}
        </div>
      </div>
      <fieldset>
        <legend className="field-label">Roles</legend>
        <div className="flex flex-wrap gap-3">
          {ROLES.map((r) => (
            <label key={r} className="flex min-h-11 items-center gap-2 rounded-lg border border-ink-100 px-3">
              <input type="checkbox" value={r} {...register('roles')} /> {ROLE_LABELS[r]}
            </label>
          ))}
        </div>
        {formState.errors.roles && <p className="field-error">{formState.errors.roles.message}</p>}
      </fieldset>
      <div className="max-w-xs">
        <label htmlFor="invite-crew" className="field-label">Crew</label>
        <select id="invite-crew" className="field-input" {...register('crewId', { setValueAs: (v) => v || null })}>
          <option value="">No crew</option>
          {crews.data?.items.map((c) => (
            <option key={c.id} value={c.id}>{c.name}</option>
          ))}
        </select>
      </div>
      {notice && (
        <p role={notice.kind === 'error' ? 'alert' : 'status'} className={`rounded-lg p-3 text-sm font-medium ${notice.kind === 'ok' ? 'bg-green-50 text-go' : notice.kind === 'warn' ? 'bg-brass-100 text-ink-900' : 'bg-red-50 text-alarm'}`}>
          {notice.text}
        </p>
      )}
      <button type="submit" className="btn-primary" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Sending…' : 'Send invitation'}
      </button>
    </form>
  );
}
