import { useSyncExternalStore } from 'react';
import { getOutbox, subscribeOutbox, type OutboxSnapshot } from './outbox.ts';

/** The outbox as React state. */
export function useOutbox(): OutboxSnapshot {
  return useSyncExternalStore(subscribeOutbox, getOutbox, getOutbox);
}
