import { createBrowserRouter } from 'react-router';
import { AppLayout } from './layout.tsx';
import { homeRedirect, requireSession, RoleGate, RouteErrorBoundary, signInLoader } from './route-guards.tsx';
import { SignInPage } from '../features/auth/sign-in-page.tsx';
import { AccountPage } from '../features/account/account-page.tsx';
import { RoleHome } from '../features/home/role-home.tsx';
import { StatusPage } from '../components/status-page.tsx';

function Loading() {
  return <p className="p-8 text-center text-ink-700">Loading…</p>;
}

export const router = createBrowserRouter([
  {
    HydrateFallback: Loading,
    ErrorBoundary: RouteErrorBoundary,
    children: [
      { path: '/sign-in', loader: signInLoader, Component: SignInPage },
      {
        path: '/',
        loader: requireSession,
        Component: AppLayout,
        ErrorBoundary: RouteErrorBoundary,
        children: [
          { index: true, loader: homeRedirect },
          { path: 'field', element: <RoleGate roles={['surveyor']}><RoleHome role="surveyor" /></RoleGate> },
          { path: 'review', element: <RoleGate roles={['safety']}><RoleHome role="safety" /></RoleGate> },
          { path: 'planning', element: <RoleGate roles={['planner']}><RoleHome role="planner" /></RoleGate> },
          { path: 'admin', element: <RoleGate roles={['admin']}><RoleHome role="admin" /></RoleGate> },
          { path: 'account', Component: AccountPage },
          { path: '*', element: <StatusPage code={404} title="Nothing here" message="That page does not exist." /> },
        ],
      },
    ],
  },
]);
