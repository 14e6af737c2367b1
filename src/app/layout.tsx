import { NavLink, Outlet, useNavigate } from 'react-router';
import { ROLE_LABELS } from '#shared/roles.ts';
import { Logo } from '../components/logo.tsx';
import { signOut, useMe } from '../features/auth/queries.ts';
import { ConnectionIndicator } from '../features/outbox/connection-indicator.tsx';
import { clearDeviceCache } from '../lib/query-client.ts';
import { clearAreas } from '../features/offline-areas/areas.ts';
import { MenuButton } from '../components/menu-button.tsx';
import { INLINE_TABLET, INLINE_WIDE, navFor } from './nav.ts';

export function AppLayout() {
  const me = useMe();
  const navigate = useNavigate();
  const onSignOut = async () => {
    await signOut().catch(() => undefined);
    // A shared tablet: the next person does not see this person's records.
    await clearDeviceCache();
    // And the areas taken offline (tiles, thumbnails, the list).
    await clearAreas(me.id).catch(() => undefined);
    navigate('/sign-in', { replace: true });
  };
  const items = navFor(me.roles);
  return (
    <div className="flex min-h-full flex-col">
      <header className="bg-ink-900 text-chalk">
        {/* One row at every width from the 820 px tablet up: the first places in the bar, the rest under "More". */}
        <div className="mx-auto flex max-w-7xl flex-nowrap items-center gap-x-3 px-4 py-2" data-testid="app-bar">
          <NavLink to="/" className="flex shrink-0 items-center gap-2 text-lg font-bold">
            <Logo /> Roostline
          </NavLink>
          <nav aria-label="Main" className="flex min-w-0 flex-1 flex-nowrap items-center gap-1">
            {items.map((item, i) => (
              <NavLink
                key={item.to}
                to={item.to}
                // A parent entry (/admin) is not highlighted while one of its own entries (/admin/audit) is.
                end={items.some((other) => other.to.startsWith(item.to + '/'))}
                className={({ isActive }) =>
                  `${i < INLINE_TABLET ? 'flex' : i < INLINE_WIDE ? 'hidden xl:flex' : 'hidden'} min-h-10 items-center whitespace-nowrap rounded-lg px-3 py-2 text-sm font-semibold ${isActive ? 'bg-brass-500 text-ink-900' : 'text-ink-100 hover:bg-ink-700'}`
                }
              >
                {item.label}
              </NavLink>
            ))}
            {items.length > INLINE_TABLET && (
              <MenuButton label="More" align="left" className={items.length > INLINE_WIDE ? '' : 'xl:hidden'}>
                {(close) => (
                  <ul className="flex flex-col" aria-label="More places">
                    {items.map((item, i) =>
                      i < INLINE_TABLET ? null : (
                        <li key={item.to} className={i < INLINE_WIDE ? 'xl:hidden' : ''}>
                          <NavLink
                            to={item.to}
                            end={items.some((other) => other.to.startsWith(item.to + '/'))}
                            onClick={close}
                            className={({ isActive }) => `flex min-h-11 items-center rounded-lg px-3 text-sm font-semibold ${isActive ? 'bg-brass-500 text-ink-900' : 'text-ink-100 hover:bg-ink-700'}`}
                          >
                            {item.label}
                          </NavLink>
                        </li>
                      ),
                    )}
                  </ul>
                )}
              </MenuButton>
            )}
          </nav>
          <ConnectionIndicator userId={me.id} />
          <MenuButton label={<span data-testid="who" className="max-w-40 truncate">{me.name}</span>} className="shrink-0">
            {(close) => (
              <div className="space-y-1 p-2 text-sm">
                <p className="px-1 text-ink-300">{me.roles.map((r) => ROLE_LABELS[r]).join(', ')}</p>
                <NavLink to="/account" onClick={close} className="flex min-h-11 items-center rounded-lg px-2 font-semibold text-ink-100 hover:bg-ink-700">
                  Account
                </NavLink>
                <button type="button" onClick={onSignOut} className="flex min-h-11 w-full items-center rounded-lg border border-ink-500 px-2 font-semibold hover:bg-ink-700">
                  Sign out
                </button>
              </div>
            )}
          </MenuButton>
        </div>
      </header>
      <main className="mx-auto w-full max-w-7xl flex-1 p-4">
        <Outlet />
      </main>
    </div>
  );
}
