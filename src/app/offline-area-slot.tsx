// Which records an area taken offline keeps, composed here because they belong to several features: each is read
// with the same query the screens use, so the kept query cache (src/lib/query-client.ts) answers them offline.
import { useMemo } from 'react';
import { useQueryClient, type FetchQueryOptions, type QueryClient } from '@tanstack/react-query';
import type { Map as MapLibreMap } from 'maplibre-gl';
import { OfflineAreaPanel } from '../features/offline-areas/offline-area-panel.tsx';
import { useMe } from '../features/auth/queries.ts';
import type { RecordPlan, RecordTask } from '../features/offline-areas/areas.ts';
import { inventoryQueries, spanQueries } from '../features/spans/queries.ts';
import { fieldQueries } from '../features/field/queries.ts';
import { QUEUE_GROUPS } from '../features/field/queue.ts';
import { photoQueries } from '../features/photos/queries.ts';

const size = (data: unknown) => JSON.stringify(data ?? null).length;

export function offlineRecordPlan(queryClient: QueryClient, userId: string): RecordPlan {
  return (contents) => {
    const read = <T, K extends readonly unknown[]>(opts: FetchQueryOptions<T, Error, T, K>): RecordTask => ({ run: async () => size(await queryClient.fetchQuery({ ...opts, staleTime: 0 })) });
    const tasks: RecordTask[] = [
      read(inventoryQueries.lines()),
      read(inventoryQueries.conductors()),
      read(inventoryQueries.hazardKinds()),
      // The surveyor's own queue (every area's work starts there): the first page of each group.
      ...QUEUE_GROUPS.map((g) => ({ run: async () => size(await queryClient.fetchInfiniteQuery({ ...fieldQueries.queueGroup(userId, g.statuses), staleTime: 0 })) })),
    ];
    for (const lineId of contents.lineIds) tasks.push(read(inventoryQueries.structures(lineId)));
    for (const s of contents.spans) {
      tasks.push(read(spanQueries.detail(s.id)), read(spanQueries.history(s.id)), read(photoQueries.bySpan(s.id)));
    }
    return tasks;
  };
}

/** The map's "Offline areas" panel, with the records plan of the signed-in user. */
export function MapOfflineAreas({ map, onDrawingChange }: { map: MapLibreMap; onDrawingChange: (drawing: boolean) => void }) {
  const me = useMe();
  const queryClient = useQueryClient();
  const plan = useMemo(() => offlineRecordPlan(queryClient, me.id), [queryClient, me.id]);
  return <OfflineAreaPanel map={map} userId={me.id} plan={plan} onDrawingChange={onDrawingChange} />;
}
