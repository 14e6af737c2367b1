import { NavLink, Outlet, useNavigate } from 'react-router';
import { ROLE_LABELS } from '#shared/roles.ts';
import { Logo } from '../components/logo.tsx';
import { signOut, useMe } from '../features/auth/queries.ts';
import { navFor } from './nav.ts';
import { clearDeviceCache } from '../lib/query-client.ts';

export function AppLayout() {
  const me = useMe();
  const navigate = useNavigate();
  const onSignOut = async () => {
    await signOut().catch(() => undefined);
    // A shared tablet: the next person does not see this person's records.
    await clearDeviceCache();
    navigate('/sign-in', { replace: true });
  };
  return (
    <div className="flex min-h-full flex-col">
      <header className="bg-ink-900 text-chalk">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2">
          <NavLink to="/" className="flex items-center gap-2 text-lg font-bold">
            <Logo /> Roostline
          </NavLink>
          <nav aria-label="Main" className="flex flex-1 flex-wrap gap-1">
            {navFor(me.roles).map((item, _i, items) => (
              <NavLink
                key={item.to}
                to={item.to}
                // A parent entry (/admin) is not highlighted while one of its own entries (/admin/audit) is.
                end={items.some((other) => other.to.startsWith(item.to + '/'))}
                className={({ isActive }) =>
                  `rounded-lg px-3 py-2 text-sm font-semibold ${isActive ? 'bg-brass-500 text-ink-900' : 'text-ink-100 hover:bg-ink-700'}`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <div className="flex items-center gap-3 text-sm">
            <span data-testid="who">
              {me.name} <span className="text-ink-300">· {me.roles.map((r) => ROLE_LABELS[r]).join(', ')}</span>
            </span>
            <button type="button" onClick={onSignOut} className="rounded-lg border border-ink-500 px-3 py-2 font-semibold hover:bg-ink-700">
              Sign out
            </button>
          </div>
        </div>
      </header>
      <main className="mx-auto w-full max-w-7xl flex-1 p-4">
        <Outlet />
      </main>
    </div>
  );
}
