// The field feature's queries: the surveyor's own spans, on the shared span list factory (same keys, same invalidation).
import { spanQueries } from '../spans/queries.ts';

export const fieldQueries = {
  mySpans: (surveyorId: string) => spanQueries.list({ surveyorId, pageSize: 200, sort: '-updatedAt' }),
};
