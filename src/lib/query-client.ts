import { onlineManager, QueryClient, type Query } from '@tanstack/react-query';
import { persistQueryClient } from '@tanstack/react-query-persist-client';
import { createAsyncStoragePersister } from '@tanstack/query-async-storage-persister';
import { createStore, del, get, set } from 'idb-keyval';
import { ApiError } from './api.ts';

/** How long a record read online stays usable offline (the field crews' longest trip, common practice: a working week). */
export const OFFLINE_MAX_AGE_MS = 7 * 24 * 60 * 60_000;

export const queryClient = new QueryClient({
  defaultOptions: {
    queries: {
      staleTime: 30_000,
      // Kept in memory as long as the persisted copy may be used, so a reload offline finds it.
      gcTime: OFFLINE_MAX_AGE_MS,
      // A 4xx will not change on retry; network trouble and 5xx may.
      retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2,
    },
  },
});

// The online manager only hears later online/offline events: a tablet opened with no signal starts offline.
if (typeof navigator !== 'undefined' && navigator.onLine === false) onlineManager.setOnline(false);

const canPersist = typeof indexedDB !== 'undefined';
const cacheStore = canPersist ? createStore('roostline-cache', 'queries') : undefined;
const persister = createAsyncStoragePersister({
  key: 'roostline-queries',
  storage: cacheStore
    ? { getItem: (k) => get<string>(k, cacheStore).then((v) => v ?? null), setItem: (k, v) => set(k, v, cacheStore), removeItem: (k) => del(k, cacheStore) }
    : undefined,
  throttleTime: 1000,
});

/**
 * Which queries the device keeps: every one holding data, also when its last refetch failed (a refetch with no
 * signal leaves the query in error with its data; dropping it then would lose who is signed in, or a record, at the
 * next reload offline).
 */
export function keptOnDevice(q: Query): boolean {
  return q.state.data !== undefined && q.state.data !== null;
}

/**
 * The query cache is kept in IndexedDB, so lists, records and catalogues read online open after a reload with no
 * signal. Loaders wait for it (`cacheRestored`) before asking for anything.
 */
export const cacheRestored: Promise<void> = canPersist
  ? persistQueryClient({
      queryClient,
      persister,
      maxAge: OFFLINE_MAX_AGE_MS,
      buster: 'v1',
      dehydrateOptions: { shouldDehydrateQuery: keptOnDevice },
    })[1].catch(() => undefined)
  : Promise.resolve();

/** Forgets every record kept on this device (sign-out on a shared tablet). */
export async function clearDeviceCache() {
  queryClient.clear();
  await persister.removeClient();
}
