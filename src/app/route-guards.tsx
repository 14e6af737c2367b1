import type { ReactNode } from 'react';
import { onlineManager } from '@tanstack/react-query';
import { redirect, isRouteErrorResponse, useRouteError, type LoaderFunctionArgs } from 'react-router';
import type { Role } from '#shared/roles.ts';
import { homeFor } from '#shared/roles.ts';
import { cacheRestored, queryClient } from '../lib/query-client.ts';
import { authQueries, useMe } from '../features/auth/queries.ts';
import { StatusPage } from '../components/status-page.tsx';
import { ApiError, isNetworkError } from '../lib/api.ts';

/** Loader of the signed-in layout: no session → the sign-in page, remembering where the user was going. */
/**
 * Who is signed in: the copy kept on the device (restored from IndexedDB) when there is one, else the server.
 * With no signal and no copy, nobody (sign-in says it needs a connection).
 */
let askedServer = false;
/** The device kept a user but the server says nobody: the session ended while the app was closed. */
let endedWhileAway = false;
export async function currentUser() {
  await cacheRestored;
  const kept = queryClient.getQueryData(authQueries.me().queryKey) ?? null;
  try {
    // The first time after a page load the server decides (a session may have ended); later the cache is enough.
    if (!askedServer && onlineManager.isOnline()) {
      const me = await queryClient.fetchQuery({ ...authQueries.me(), staleTime: 0 });
      askedServer = true;
      endedWhileAway = !!kept && !me;
      return me;
    }
    return await queryClient.ensureQueryData(authQueries.me());
  } catch (err) {
    if (isNetworkError(err)) return kept;
    throw err;
  }
}

export async function requireSession({ request }: LoaderFunctionArgs) {
  const me = await currentUser();
  if (!me) {
    const url = new URL(request.url);
    throw redirect(signInUrl(url.pathname + url.search, endedWhileAway));
  }
  return null;
}

/** The sign-in page, coming back to `next` afterwards; `ended` makes it say the session ended. */
export function signInUrl(next: string, ended = false) {
  return `/sign-in?${ended ? 'ended=1&' : ''}next=${encodeURIComponent(next)}`;
}

export async function homeRedirect() {
  const me = await currentUser();
  return redirect(me ? homeFor(me.roles) : '/sign-in');
}

export async function signInLoader({ request }: LoaderFunctionArgs) {
  // Sent here because the server ended the session: the page is shown whatever the device still remembers.
  if (new URL(request.url).searchParams.has('ended')) return null;
  const me = await currentUser();
  return me ? redirect(homeFor(me.roles)) : null;
}

/** Shows its children only to the given roles (the server enforces the same rule). */
export function RoleGate({ roles, children }: { roles: Role[]; children: ReactNode }) {
  const me = useMe();
  if (!roles.some((r) => me.roles.includes(r))) {
    return <StatusPage code={403} title="Not part of your role" message="This page belongs to another role. Ask an admin if you need it." />;
  }
  return <>{children}</>;
}

/** Error boundary for routes: expected API statuses get a plain page, anything else a generic one. */
export function RouteErrorBoundary() {
  const error = useRouteError();
  if (isRouteErrorResponse(error) && error.status === 404) {
    return <StatusPage code={404} title="Nothing here" message="That page does not exist." />;
  }
  if (error instanceof ApiError) {
    if (error.status === 404) return <StatusPage code={404} title="Not found" message={error.message} />;
    if (error.status === 403) return <StatusPage code={403} title="Not part of your role" message={error.message} />;
    return <StatusPage code={error.status} title="The server refused" message={error.message} />;
  }
  return <StatusPage title="Something went wrong" message="This page failed to load. Try again; if it keeps failing, tell an admin." />;
}
