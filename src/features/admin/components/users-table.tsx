import { createContext, useContext, useEffect, useMemo, useRef, useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { ROLES, ROLE_LABELS, type Role } from '#shared/roles.ts';
import type { AdminUser } from '#shared/schemas/accounts.ts';
import { ApiError } from '../../../lib/api.ts';
import { useMe } from '../../auth/queries.ts';
import { adminApi, type UserFilters } from '../api.ts';
import { adminQueries, auditQueries } from '../queries.ts';
import { dateTime } from '../format.ts';
import { api } from '../../../lib/api.ts';

function useDebounced<T>(value: T, ms = 250) {
  const [v, setV] = useState(value);
  useEffect(() => {
    const id = setTimeout(() => setV(value), ms);
    return () => clearTimeout(id);
  }, [value, ms]);
  return v;
}

/** What the last decision did, said where the pointer is not (a fixed bar at the foot of the screen), with its undo. */
interface Notice {
  text: string;
  /** Undoes the decision and says what it did. */
  undo?: () => Promise<string>;
  tone?: 'ok' | 'error';
}
const NoticeContext = createContext<(n: Notice) => void>(() => undefined);

function NoticeBar({ notice, onClose, show }: { notice: Notice | null; onClose: () => void; show: (n: Notice) => void }) {
  const [undoing, setUndoing] = useState(false);
  const [undoError, setUndoError] = useState<string | null>(null);
  useEffect(() => {
    setUndoError(null);
    if (!notice) return;
    const t = setTimeout(onClose, 12_000);
    return () => clearTimeout(t);
  }, [notice, onClose]);
  return (
    <div role="status" aria-live="polite" className="pointer-events-none fixed inset-x-0 bottom-4 z-50 flex justify-center px-4">
      {notice && (
        <div className={`pointer-events-auto flex max-w-xl items-center gap-3 rounded-xl px-4 py-3 text-sm shadow-lg ${notice.tone === 'error' ? 'bg-alarm text-white' : 'bg-ink-900 text-chalk'}`} data-testid="admin-notice">
          <span>{undoError ?? notice.text}</span>
          {notice.undo && !undoError && (
            <button
              type="button"
              className="min-h-10 rounded-lg bg-brass-500 px-3 font-semibold text-ink-900"
              disabled={undoing}
              onClick={async () => {
                setUndoing(true);
                try {
                  show({ text: await notice.undo!() });
                } catch (e) {
                  setUndoError(`Could not undo: ${(e as Error).message}`);
                } finally {
                  setUndoing(false);
                }
              }}
            >
              Undo
            </button>
          )}
          <button type="button" className="min-h-10 px-2 font-semibold" aria-label="Close the message" onClick={onClose}>×</button>
        </div>
      )}
    </div>
  );
}

/**
 * The rows stay where they were while the filters stay the same: a person deactivated under "Active" keeps their row
 * (now showing "Deactivated" and "Reactivate") until the filters change, so the next row never moves under the pointer.
 */
function useSteadyRows(items: AdminUser[] | undefined, filterKey: string) {
  const order = useRef<{ key: string; rows: AdminUser[] }>({ key: filterKey, rows: [] });
  return useMemo(() => {
    if (!items) return order.current.key === filterKey ? order.current.rows : [];
    const fresh = new Map(items.map((u) => [u.id, u]));
    let rows: AdminUser[];
    if (order.current.key !== filterKey) rows = items;
    else {
      const kept = order.current.rows.map((u) => fresh.get(u.id) ?? keptAside.get(u.id) ?? null).filter((u): u is AdminUser => u !== null);
      const seen = new Set(kept.map((u) => u.id));
      rows = [...kept, ...items.filter((u) => !seen.has(u.id))];
    }
    order.current = { key: filterKey, rows };
    return rows;
  }, [items, filterKey]);
}
/** The latest answer for a person whose row left the filtered list after a decision on this screen. */
const keptAside = new Map<string, AdminUser>();

export function UsersTable() {
  const [search, setSearch] = useState('');
  const [filters, setFilters] = useState<Omit<UserFilters, 'q'>>({ active: 'true' });
  const q = useDebounced(search);
  const users = useQuery(adminQueries.users({ ...filters, q }));
  const rows = useSteadyRows(users.data?.items, JSON.stringify({ ...filters, q }));
  const [notice, setNotice] = useState<Notice | null>(null);
  const closeNotice = useMemo(() => () => setNotice(null), []);
  const crews = useQuery(adminQueries.crews());
  const [editing, setEditing] = useState<string | null>(null);
  const set = (k: keyof UserFilters) => (e: React.ChangeEvent<HTMLSelectElement>) => setFilters((f) => ({ ...f, [k]: e.target.value || undefined, page: 1 }));

  return (
    <NoticeContext.Provider value={setNotice}>
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
        <table className="w-full table-fixed text-left text-sm">
          <thead className="border-b border-ink-100 text-ink-700">
            <tr>
              {/* Fixed column widths: a decision that changes one row's words never re-flows the table. */}
              <th className="py-2 pr-3">Name</th>
              <th className="w-36 py-2 pr-3">Roles</th>
              <th className="hidden w-32 py-2 pr-3 lg:table-cell">Crew</th>
              <th className="hidden w-40 py-2 pr-3 lg:table-cell">Last sign-in</th>
              <th className="w-28 py-2 pr-3">Status</th>
              <th className="w-[21.5rem] py-2"><span className="sr-only">Actions</span></th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-100">
            {rows.map((u) =>
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
      <NoticeBar notice={notice} onClose={closeNotice} show={setNotice} />
    </section>
    </NoticeContext.Provider>
  );
}

function useInvalidate() {
  const queryClient = useQueryClient();
  return () => Promise.all([queryClient.invalidateQueries({ queryKey: adminQueries.all }), queryClient.invalidateQueries({ queryKey: auditQueries.all })]);
}

/** Buttons that change their words keep their size: no wrapping, text clipped rather than the cell growing. */
const FIXED = 'shrink-0 overflow-hidden whitespace-nowrap px-2 text-sm';

function UserRow({ user, onEdit }: { user: AdminUser; onEdit: () => void }) {
  const me = useMe();
  const invalidate = useInvalidate();
  const notify = useContext(NoticeContext);
  // A consequential step asks once more in the same place: the button turns into its own confirmation.
  const [confirming, setConfirming] = useState<null | 'deactivate' | 'reset'>(null);
  useEffect(() => {
    if (!confirming) return;
    const t = setTimeout(() => setConfirming(null), 6000);
    return () => clearTimeout(t);
  }, [confirming]);
  const remember = (u: AdminUser) => keptAside.set(u.id, u);
  const deactivate = async () => {
    const after = await adminApi.deactivate(user.id);
    remember(after);
    await invalidate();
    notify({
      text: `${user.name} is deactivated and signed out everywhere.`,
      undo: async () => {
        remember(await adminApi.reactivate(user.id));
        await invalidate();
        return `${user.name} is active again; they sign in with their password.`;
      },
    });
  };
  const reactivate = async () => {
    const after = await adminApi.reactivate(user.id);
    remember(after);
    await invalidate();
    notify({
      text: `${user.name} is active again.`,
      undo: async () => {
        remember(await adminApi.deactivate(user.id));
        await invalidate();
        return `${user.name} is deactivated again.`;
      },
    });
  };
  const sendReset = async () => {
    await api.post('/api/auth/request-password-reset', { email: user.email });
    notify({ text: `A password reset link is on its way to ${user.email} (valid for a short time; their password works until they change it).` });
  };
  const act = useMutation({
    mutationFn: (what: 'deactivate' | 'reactivate' | 'reset') => (what === 'deactivate' ? deactivate() : what === 'reactivate' ? reactivate() : sendReset()),
    onError: (e) => notify({ text: e.message, tone: 'error' }),
    onSettled: () => setConfirming(null),
  });
  const onToggle = () => {
    if (!user.active) return act.mutate('reactivate');
    if (confirming !== 'deactivate') return setConfirming('deactivate');
    act.mutate('deactivate');
  };
  const onReset = () => {
    if (confirming !== 'reset') return setConfirming('reset');
    act.mutate('reset');
  };
  return (
    <tr className={user.active ? '' : 'text-ink-500'} data-user-id={user.id}>
      <td className="py-2 pr-3">
        <p className="truncate font-semibold" title={user.name}>{user.name}</p>
        <p className="truncate text-ink-700" title={user.email}>{user.email}</p>
      </td>
      <td className="py-2 pr-3">{user.roles.map((r) => ROLE_LABELS[r]).join(', ')}</td>
      <td className="hidden py-2 pr-3 lg:table-cell">{user.crewName ?? '—'}</td>
      <td className="hidden py-2 pr-3 lg:table-cell">{user.lastSignInAt ? dateTime(user.lastSignInAt) : 'Never'}</td>
      <td className="py-2 pr-3">
        {user.active ? <span className="font-semibold text-go">Active</span> : <span className="font-semibold text-alarm">Deactivated</span>}
      </td>
      <td className="py-2">
        {/* Fixed widths: a button that changes its words keeps its place and size, and so does every other row. */}
        <div className="flex flex-nowrap justify-end gap-2">
          <button type="button" className={`btn-ghost w-14 ${FIXED}`} onClick={onEdit} aria-label={`Edit ${user.name}`}>Edit</button>
          {user.id !== me.id && (
            <>
              <button type="button" className={`btn-ghost w-28 ${FIXED}`} disabled={act.isPending || !user.active} onClick={onReset} aria-label={confirming === 'reset' ? `Confirm: send ${user.name} a reset link` : `Send ${user.name} a password reset link`}>
                {confirming === 'reset' ? 'Yes, send it' : 'Reset link'}
              </button>
              <button
                type="button"
                className={`w-36 ${FIXED} ${user.active ? 'btn-danger' : 'btn-accent'}`}
                disabled={act.isPending}
                onClick={onToggle}
                aria-label={confirming === 'deactivate' ? `Confirm: deactivate ${user.name}` : `${user.active ? 'Deactivate' : 'Reactivate'} ${user.name}`}
              >
                {confirming === 'deactivate' ? 'Yes, deactivate' : user.active ? 'Deactivate' : 'Reactivate'}
              </button>
            </>
          )}
        </div>
      </td>
    </tr>
  );
}

const rolesText = (roles: readonly Role[]) => roles.map((r) => ROLE_LABELS[r]).join(', ') || 'none';

function EditRow({ user, onDone }: { user: AdminUser; onDone: () => void }) {
  const invalidate = useInvalidate();
  const crews = useQuery(adminQueries.crews());
  const [name, setName] = useState(user.name);
  const [roles, setRoles] = useState<Role[]>(user.roles);
  const [crewId, setCrewId] = useState(user.crewId ?? '');
  const notify = useContext(NoticeContext);
  const save = useMutation({
    mutationFn: () => adminApi.updateUser(user.id, { name, roles, crewId: crewId || null }),
    onSuccess: async (after) => {
      keptAside.set(after.id, after);
      await invalidate();
      onDone();
      const was = { name: user.name, roles: user.roles, crewId: user.crewId ?? null };
      const changed = [
        was.name !== after.name && `name ${was.name} → ${after.name}`,
        was.roles.join() !== after.roles.join() && `roles ${rolesText(was.roles)} → ${rolesText(after.roles)}`,
        (was.crewId ?? null) !== (after.crewId ?? null) && `crew ${user.crewName ?? 'none'} → ${after.crewName ?? 'none'}`,
      ].filter(Boolean);
      if (!changed.length) return notify({ text: `Nothing changed for ${after.name}.` });
      notify({
        text: `${after.name}: ${changed.join('; ')}.`,
        undo: async () => {
          keptAside.set(after.id, await adminApi.updateUser(user.id, was));
          await invalidate();
          return `${was.name} is back as before.`;
        },
      });
    },
  });
  const err = save.error instanceof ApiError ? save.error : null;
  return (
    <tr className="bg-ink-50" data-editing="true">
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
