// Test networks for the mission API: approved, perchable demo-grade spans placed along an east–west route.
import type { MikroORM } from '@mikro-orm/sqlite';
import { Span } from '../../server/modules/inventory/span.entity.ts';
import { assessSpans } from '../../server/modules/assessment/assessment.service.ts';
import { makeLine, makeSpan } from './assessment-helpers.ts';
import type { Line } from '../../server/modules/inventory/line.entity.ts';

/** Degrees of longitude for `m` metres east at latitude `lat` (spherical, good to a fraction of a percent here). */
export const lonFor = (m: number, lat: number) => m / (111_320 * Math.cos((lat * Math.PI) / 180));

/**
 * Spans whose mid-points lie `eastM` metres east of (lat, lon0), each on its own 300 m span, assessed and set to
 * `status` (approved by default). Returns the spans in the order given.
 */
export async function spansAlong(orm: MikroORM, line: Line, lat: number, lon0: number, eastM: number[], status: Span['status'] = 'approved') {
  const spans: Span[] = [];
  for (const m of eastM) {
    // makeSpan's span runs 0.0031° east of its from-structure; centre it on the wanted mid-point.
    spans.push(await makeSpan(orm, line, { lat, lon: lon0 + lonFor(m, lat) - 0.00155, notify: false }));
  }
  const em = orm.em.fork();
  await assessSpans(em, spans.map((s) => s.id));
  await em.nativeUpdate(Span, { id: { $in: spans.map((s) => s.id) } }, { status });
  return spans;
}

export { makeLine };
