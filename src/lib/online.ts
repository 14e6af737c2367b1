// Whether the device has a network, from TanStack Query's online manager (browser online/offline events).
import { useSyncExternalStore } from 'react';
import { onlineManager } from '@tanstack/react-query';

export function useOnline(): boolean {
  return useSyncExternalStore(
    (cb) => onlineManager.subscribe(cb),
    () => onlineManager.isOnline(),
    () => true,
  );
}
