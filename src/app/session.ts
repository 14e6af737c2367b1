// A session that ends while the app is open (it expired, was signed out on another device, the account was
// deactivated): the API client reports the 401 here, and the user goes to the sign-in page, which says so and
// brings them back to the same page (path and query) afterwards. Records kept on the device stay (offline work).
import { onSessionEnded } from '../lib/api.ts';
import { queryClient } from '../lib/query-client.ts';
import { authQueries } from '../features/auth/queries.ts';
import { signInUrl } from './route-guards.tsx';

export function handleEndedSessions(router: { navigate: (to: string, opts?: { replace?: boolean }) => Promise<void> | void; state: { location: { pathname: string; search: string } } }) {
  let redirecting = false;
  onSessionEnded(() => {
    const { pathname, search } = router.state.location;
    if (redirecting || pathname === '/sign-in') return;
    redirecting = true;
    void queryClient.cancelQueries();
    void Promise.resolve(router.navigate(signInUrl(pathname + search, true), { replace: true })).finally(() => {
      // Nobody is signed in now (set once the signed-in screens are gone, which read the user).
      queryClient.setQueryData(authQueries.me().queryKey, null);
      redirecting = false;
    });
  });
}
