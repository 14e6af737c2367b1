import { queryOptions, useQuery } from '@tanstack/react-query';
import type { MeUser, SignInInput } from '#shared/schemas/auth.ts';
import { api } from '../../lib/api.ts';

export const authQueries = {
  me: () =>
    queryOptions({
      queryKey: ['me'],
      // The app's probe answers 200 with or without a session (null: nobody), so a signed-out page load logs no error.
      queryFn: async (): Promise<MeUser | null> => (await api.get<{ user: MeUser | null }>('/api/auth/session')).user,
      staleTime: 60_000,
      // Asked even with no signal: the loaders then fall back to the copy kept on the device (or to sign-in).
      networkMode: 'always',
      retry: false,
    }),
};

export const signIn = (input: SignInInput) => api.post<{ user: MeUser }>('/api/auth/sign-in', input);
export const signOut = () => api.post<void>('/api/auth/sign-out');

/** The signed-in user; only used below the authenticated layout, where it is always loaded. */
export function useMe(): MeUser {
  const { data } = useQuery(authQueries.me());
  if (!data) throw new Error('useMe() outside the signed-in layout');
  return data;
}
