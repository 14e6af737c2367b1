// The demo's approvals, settled against the assessment: an approved span that no active harvester × drone pair can
// perch on (its clearance was measured below the code minimum, its load gives too little harvest) was never a
// decision a safety officer would have made, so it goes back to the surveyor, or waits in the review queue, with
// the failing gate in words. Two approved spans are then deliberately caught by a no-perch zone drawn after their
// approval (a raptor nest), so the review desk has "needs a decision" cases to show.
import type { EntityManager } from '@mikro-orm/core';
import type { Polygon } from 'geojson';
import { User } from '../modules/auth/user.entity.ts';
import { Span } from '../modules/inventory/span.entity.ts';
import { Structure } from '../modules/inventory/structure.entity.ts';
import { Line } from '../modules/inventory/line.entity.ts';
import { Zone } from '../modules/zones/zone.entity.ts';
import { assessSpans, assessSpansBulk, perchStandings, spansNear } from '../modules/assessment/index.ts';
import { newId } from '../modules/inventory/inventory.service.ts';
import { ensureAssessmentDefaults } from '../modules/assessment/profiles.service.ts';
import { DEMO_LINES } from './demo-inventory.ts';

/** The demo's deliberate "needs a decision" zone. */
export const DEMO_NEST_ZONE = {
  name: 'Raptor nest on the Vale Ridge towers',
  reason: 'A pair of raptors is nesting on a Vale Ridge tower; no perching on the spans either side until a survey finds the nest empty.',
  validFrom: '2026-11-20',
};

/** Half-width of the square zone drawn around the nesting tower, in degrees of latitude (≈ 45 m). */
const NEST_HALF_DEG = 0.0004;

/** What a returned span's surveyor is asked to do, per failing gate. */
const RETURN_WORDS: Record<string, string> = {
  clearance: 'Fails the clearance gate: the clearance at the perch point is below the code minimum plus the drone’s margin. Measure again under the conductor at mid-span.',
  'useful-harvest': 'Fails the useful harvest gate: at this span’s typical load no harvester gives its useful minimum. Check the span’s load estimate with the line records.',
  'contact-temperature': 'Fails the contact temperature gate: the conductor runs hotter than the harvester’s contact limit. Check the conductor and load records.',
  'gripper-fit': 'Fails the gripper fit gate: the conductor diameter is outside every harvester’s gripper range. Check the code word on the structure tag.',
  'no-perch-zone': 'Lies in an active no-perch zone. Return once the zone is lifted.',
};

export interface DemoDecisionsResult {
  /** Approved spans sent back to the surveyor or to the review queue because they fail a blocking gate. */
  settled: number;
  /** The deliberate "needs a decision" spans (approved, now inside the nest zone). */
  flaggedSpanIds: string[];
  zoneId: string | null;
}

/**
 * Assesses the seeded inventory, settles the approvals that fail a blocking gate, then draws the nest zone over
 * two approved, perchable spans of the first line. Runs once, after the inventory and load series are seeded.
 */
export async function seedDemoDecisions(em: EntityManager): Promise<DemoDecisionsResult> {
  await ensureAssessmentDefaults(em);
  // The whole inventory at once: the background rescoring's bulk path (its rows equal the per-span path's, tested).
  await assessSpansBulk(em, undefined, { clearBetweenBatches: true });
  em.clear();

  const approved = await em.find(Span, { status: 'approved' }, { orderBy: { id: 'asc' } });
  const standings = await perchStandings(
    em,
    approved.map((s) => s.id),
  );
  let settled = 0;
  let k = 0;
  for (const span of approved) {
    const standing = standings.get(span.id);
    if (!standing || standing.perchable) continue;
    settled += 1;
    const first = standing.failing[0]?.id ?? 'clearance';
    // Every other one is still in the review queue (the desk shows its failing gates and offers the return).
    if (k++ % 2 === 0) {
      span.status = 'returned';
      span.returnReason = RETURN_WORDS[first] ?? RETURN_WORDS.clearance!;
    } else span.status = 'submitted';
    span.approvedAt = null;
    span.approvedById = null;
  }
  await em.flush();

  // The nest: the first tower past the line's 40th whose spans either side are approved and perchable.
  const line = await em.findOne(Line, { name: DEMO_LINES[0]!.name });
  const safety = await em.findOne(User, { email: 'safety@roostline.test' });
  if (!line || !safety) return { settled, flaggedSpanIds: [], zoneId: null };
  const structures = await em.find(Structure, { lineId: line.id }, { orderBy: { label: 'asc' } });
  const spans = await em.find(Span, { lineId: line.id });
  const perchable = await perchStandings(
    em,
    spans.map((s) => s.id),
  );
  const ok = (s: Span | undefined) => !!s && s.status === 'approved' && perchable.get(s.id)?.perchable === true;
  for (const tower of structures.slice(40)) {
    const either = spans.filter((s) => s.fromStructureId === tower.id || s.toStructureId === tower.id);
    if (either.length !== 2 || !either.every(ok)) continue;
    const d = NEST_HALF_DEG;
    const lonD = d / Math.cos((tower.lat * Math.PI) / 180);
    const geometry: Polygon = {
      type: 'Polygon',
      coordinates: [
        [
          [tower.lon - lonD, tower.lat - d],
          [tower.lon + lonD, tower.lat - d],
          [tower.lon + lonD, tower.lat + d],
          [tower.lon - lonD, tower.lat + d],
          [tower.lon - lonD, tower.lat - d],
        ],
      ],
    };
    const at = new Date(`${DEMO_NEST_ZONE.validFrom}T18:00:00Z`);
    const zone = em.create(Zone, {
      id: newId(),
      name: DEMO_NEST_ZONE.name,
      reason: DEMO_NEST_ZONE.reason,
      severity: 'exclude',
      geometry,
      validFrom: DEMO_NEST_ZONE.validFrom,
      validTo: null,
      createdById: safety.id,
      version: 1,
      createdAt: at,
      updatedAt: at,
    });
    await em.flush();
    // Every span the zone touches is assessed again (the two either side of the tower, and any other line's).
    await assessSpans(em, await spansNear(em, [geometry]));
    const flagged = (await em.find(Span, { status: 'approved' }, { fields: ['id'] })).map((s) => s.id);
    const now = await perchStandings(em, flagged);
    return { settled, flaggedSpanIds: flagged.filter((id) => now.get(id)?.perchable === false).sort(), zoneId: zone.id };
  }
  return { settled, flaggedSpanIds: [], zoneId: null };
}
