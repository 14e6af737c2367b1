import { useEffect, useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { ROLES, ROLE_LABELS, type Role } from '#shared/roles.ts';
import type { AdminUser } from '#shared/schemas/accounts.ts';
import { ApiError } from '../../../lib/api.ts';
import { useMe } from '../../auth/queries.ts';
import { adminApi, type UserFilters } from '../api.ts';
import { adminQueries, auditQueries } from '../queries.ts';
import { dateTime } from '../format.ts';

function useDebounced<T>(value: T, ms = 250) {
  const [v, setV] = useState(value);
  useEffect(() => {
    const id = setTimeout(() => setV(value), ms);
    return () => clearTimeout(id);
  }, [value, ms]);
  return v;
}

export function UsersTable() {
  const [search, setSearch] = useState('');
  const [filters, setFilters] = useState<Omit<UserFilters, 'q'>>({ active: 'true' });
  const q = useDebounced(search);
  const users = useQuery(adminQueries.users({ ...filters, q }));
  const crews = useQuery(adminQueries.crews());
  const [editing, setEditing] = useState<string | null>(null);
  const set = (k: keyof UserFilters) => (e: React.ChangeEvent<HTMLSelectElement>) => setFilters((f) => ({ ...f, [k]: e.target.value || undefined, page: 1 }));

  return (
    <section aria-labelledby="users-title" className="card space-y-3">
      <h2 id="users-title" className="text-lg font-bold">People</h2>
      <div className="grid gap-3 sm:grid-cols-4" role="search">
        <div>
          <label htmlFor="user-search" className="field-label">Search</label>
          <input id="user-search" type="search" className="field-input" placeholder="Name or e-mail" value={search} onChange={(e) => setSearch(e.target.value)} />
        </div>
        <div>
          <label htmlFor="user-role" className="field-label">Role</label>
          <select id="user-role" className="field-input" value={filters.role ?? ''} onChange={set('role')}>
            <option value="">Any role</option>
            {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="user-crew" className="field-label">Crew</label>
          <select id="user-crew" className="field-input" value={filters.crewId ?? ''} onChange={set('crewId')}>
            <option value="">Any crew</option>
            <option value="none">No crew</option>
            {crews.data?.items.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="user-active" className="field-label">Status</label>
          <select id="user-active" className="field-input" value={filters.active ?? ''} onChange={set('active')}>
            <option value="">Everyone</option>
            <option value="true">Active</option>
            <option value="false">Deactivated</option>
          </select>
        </div>
      </div>
      {users.error && <p role="alert" className="field-error">{users.error.message}</p>}
      <div className="overflow-x-auto">
        <table className="w-full min-w-[48rem] text-left text-sm">
          <thead className="border-b border-ink-100 text-ink-700">
            <tr>
              <th className="py-2 pr-3">Name</th>
              <th className="py-2 pr-3">Roles</th>
              <th className="py-2 pr-3">Crew</th>
              <th className="py-2 pr-3">Last sign-in</th>
              <th className="py-2 pr-3">Status</th>
              <th className="py-2"><span className="sr-only">Actions</span></th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-100">
            {users.data?.items.map((u) =>
              editing === u.id ? (
                <EditRow key={u.id} user={u} onDone={() => setEditing(null)} />
              ) : (
                <UserRow key={u.id} user={u} onEdit={() => setEditing(u.id)} />
              ),
            )}
          </tbody>
        </table>
      </div>
      {users.data && (
        <p className="text-sm text-ink-700">
          {users.data.total === 0 ? 'Nobody matches these filters.' : `${users.data.total} ${users.data.total === 1 ? 'person' : 'people'}`}
          {users.data.total > users.data.pageSize && (
            <span className="ml-3 inline-flex gap-2">
              <button type="button" className="btn-ghost" disabled={users.data.page <= 1} onClick={() => setFilters((f) => ({ ...f, page: (f.page ?? 1) - 1 }))}>Previous</button>
              <button type="button" className="btn-ghost" disabled={users.data.page * users.data.pageSize >= users.data.total} onClick={() => setFilters((f) => ({ ...f, page: (f.page ?? 1) + 1 }))}>Next</button>
            </span>
          )}
        </p>
      )}
    </section>
  );
}

function useInvalidate() {
  const queryClient = useQueryClient();
  return () => Promise.all([queryClient.invalidateQueries({ queryKey: adminQueries.all }), queryClient.invalidateQueries({ queryKey: auditQueries.all })]);
}

function UserRow({ user, onEdit }: { user: AdminUser; onEdit: () => void }) {
  const me = useMe();
  const invalidate = useInvalidate();
  const toggle = useMutation({
    mutationFn: () => (user.active ? adminApi.deactivate(user.id) : adminApi.reactivate(user.id)),
    onSuccess: invalidate,
  });
  const onToggle = () => {
    if (user.active && !window.confirm(`Deactivate ${user.name}? They are signed out at once and cannot sign in until reactivated.`)) return;
    toggle.mutate();
  };
  return (
    <tr className={user.active ? '' : 'text-ink-500'}>
      <td className="py-2 pr-3">
        <p className="font-semibold">{user.name}</p>
        <p className="text-ink-700">{user.email}</p>
      </td>
      <td className="py-2 pr-3">{user.roles.map((r) => ROLE_LABELS[r]).join(', ')}</td>
      <td className="py-2 pr-3">{user.crewName ?? '—'}</td>
      <td className="py-2 pr-3">{user.lastSignInAt ? dateTime(user.lastSignInAt) : 'Never'}</td>
      <td className="py-2 pr-3">
        {user.active ? <span className="font-semibold text-go">Active</span> : <span className="font-semibold text-alarm">Deactivated</span>}
      </td>
      <td className="py-2">
        <div className="flex flex-wrap justify-end gap-2">
          <button type="button" className="btn-ghost" onClick={onEdit} aria-label={`Edit ${user.name}`}>Edit</button>
          {user.id !== me.id && (
            <button type="button" className={user.active ? 'btn-danger' : 'btn-accent'} disabled={toggle.isPending} onClick={onToggle} aria-label={`${user.active ? 'Deactivate' : 'Reactivate'} ${user.name}`}>
              {user.active ? 'Deactivate' : 'Reactivate'}
            </button>
          )}
        </div>
        {toggle.error && <p role="alert" className="field-error text-right">{toggle.error.message}</p>}
      </td>
    </tr>
  );
}

function EditRow({ user, onDone }: { user: AdminUser; onDone: () => void }) {
  const invalidate = useInvalidate();
  const crews = useQuery(adminQueries.crews());
  const [name, setName] = useState(user.name);
  const [roles, setRoles] = useState<Role[]>(user.roles);
  const [crewId, setCrewId] = useState(user.crewId ?? '');
  const save = useMutation({
    mutationFn: () => adminApi.updateUser(user.id, { name, roles, crewId: crewId || null }),
    onSuccess: async () => {
      await invalidate();
      onDone();
    },
  });
  const err = save.error instanceof ApiError ? save.error : null;
  return (
    <tr className="bg-ink-50">
      <td className="py-2 pr-3 align-top">
        <label className="field-label" htmlFor={`name-${user.id}`}>Name</label>
        <input id={`name-${user.id}`} className="field-input" value={name} onChange={(e) => setName(e.target.value)} />
        {err?.issueFor('name') && <p className="field-error">{err.issueFor('name')}</p>}
        <p className="mt-1 text-ink-700">{user.email}</p>
      </td>
      <td className="py-2 pr-3 align-top">
        <fieldset>
          <legend className="field-label">Roles</legend>
          {ROLES.map((r) => (
            <label key={r} className="flex min-h-9 items-center gap-2">
              <input type="checkbox" checked={roles.includes(r)} onChange={(e) => setRoles((rs) => (e.target.checked ? [...rs, r] : rs.filter((x) => x !== r)))} />
              {ROLE_LABELS[r]}
            </label>
          ))}
        </fieldset>
        {err?.issueFor('roles') && <p className="field-error">{err.issueFor('roles')}</p>}
      </td>
      <td className="py-2 pr-3 align-top">
        <label className="field-label" htmlFor={`crew-${user.id}`}>Crew</label>
        <select id={`crew-${user.id}`} className="field-input" value={crewId} onChange={(e) => setCrewId(e.target.value)}>
          <option value="">No crew</option>
          {crews.data?.items.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}
        </select>
      </td>
      <td colSpan={3} className="py-2 align-top">
        <div className="flex flex-wrap justify-end gap-2 pt-6">
          <button type="button" className="btn-primary" disabled={save.isPending} onClick={() => save.mutate()}>Save</button>
          <button type="button" className="btn-ghost" onClick={onDone}>Cancel</button>
        </div>
        {save.error && <p role="alert" className="field-error text-right">{save.error.message}</p>}
      </td>
    </tr>
  );
}
