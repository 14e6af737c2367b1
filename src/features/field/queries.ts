// The field feature's queries: the surveyor's own spans, on the shared span list keys (same invalidation).
import type { SpanStatus } from '#shared/schemas/inventory.ts';
import { spanQueries } from '../spans/queries.ts';

/** Spans fetched per page while the surveyor scrolls their queue. */
export const QUEUE_PAGE = 200;

export const fieldQueries = {
  mySpans: (surveyorId: string) => spanQueries.list({ surveyorId, pageSize: QUEUE_PAGE, sort: '-updatedAt' }),
  /** One queue group (its statuses), most recently changed first, page after page: every record, no cap. */
  queueGroup: (surveyorId: string, statuses: readonly SpanStatus[]) =>
    // the API reads a comma-separated list of statuses
    spanQueries.pages({ surveyorId, status: statuses.join(',') as SpanStatus, sort: '-updatedAt' }, QUEUE_PAGE),
};
