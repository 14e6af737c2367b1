// The demo's mission side: the owner's permissions on the demo lines (one long expired, for show) and, once the
// spans are assessed, one saved and authorised mission from the Skelloway End depot to the Wendlecross yard that
// needs two perches on Vale Ridge 138 kV with the demo quad. Dates follow the day the demo is seeded, so a newcomer
// always finds a permission in force and a mission about to fly.
import type { EntityManager } from '@mikro-orm/core';
import { generateIdFromEntropySize } from 'lucia';
import { DEMO_TOWNS } from '#shared/demo-region.ts';
import { CLAMP_S, LIGHT_QUAD } from '#shared/engineering/demo-profiles.ts';
import { authoriseMission, createMission } from '../modules/missions/missions.service.ts';
import { User } from '../modules/auth/user.entity.ts';
import { Line } from '../modules/inventory/line.entity.ts';
import { LinePermission } from '../modules/line-permissions/line-permission.entity.ts';
import { DEMO_LINES } from './demo-inventory.ts';
import { DEMO_SERIES_OFFSET_MIN } from './demo-load-series.ts';

const town = (id: string) => {
  const t = DEMO_TOWNS.find((x) => x.id === id)!;
  return { lat: t.lat, lon: t.lon };
};

/** The demo mission's inputs (departure set at seeding). */
export const DEMO_MISSION = {
  name: 'Skelloway End depot to Wendlecross yard',
  droneProfileId: LIGHT_QUAD.id,
  harvesterProfileId: CLAMP_S.id,
  base: town('skelloway-end'),
  target: town('wendlecross'),
  objective: 'time' as const,
  returnToBase: false,
};

const pad = (n: number) => String(n).padStart(2, '0');

/** 09:00 local (the region's UTC−09:00) on the day after `now`'s local day. */
export function demoDepartAt(now = new Date()): string {
  const local = new Date(now.getTime() + DEMO_SERIES_OFFSET_MIN * 60_000);
  const next = new Date(Date.UTC(local.getUTCFullYear(), local.getUTCMonth(), local.getUTCDate() + 1));
  const off = DEMO_SERIES_OFFSET_MIN;
  const sign = off >= 0 ? '+' : '-';
  return `${next.getUTCFullYear()}-${pad(next.getUTCMonth() + 1)}-${pad(next.getUTCDate())}T09:00:00${sign}${pad(Math.floor(Math.abs(off) / 60))}:${pad(Math.abs(off) % 60)}`;
}

/** The owner's permissions on the demo lines, relative to the seeding year. */
export function demoPermissions(now = new Date()) {
  const y = now.getUTCFullYear();
  return [
    {
      line: DEMO_LINES[0]!.name,
      reference: `HVPC-PERCH-${y}-014`,
      validFrom: `${y}-01-01`,
      validTo: `${y + 1}-12-31`,
      conditions:
        'Perching between 07:00 and 19:00 local time only. Tell the Harrow Vale control desk before the first perch of the day. No perching within two spans of a crossing under works.',
    },
    {
      line: DEMO_LINES[1]!.name,
      reference: `HVPC-PERCH-${y}-022`,
      validFrom: `${y}-03-01`,
      validTo: `${y + 1}-02-28`,
      conditions: 'Weekdays only. Keep the ground crew off the farm tracks at harvest time.',
    },
    {
      // Long expired, for show: a mission perching on this feeder cannot be authorised until it is renewed.
      line: DEMO_LINES[2]!.name,
      reference: `HVPC-PERCH-${y - 2}-003`,
      validFrom: `${y - 2}-03-01`,
      validTo: `${y - 1}-02-28`,
      conditions: 'Trial season: one drone at a time, daylight only.',
    },
  ];
}

export async function seedDemoPermissions(em: EntityManager, now = new Date()): Promise<void> {
  const safety = await em.findOne(User, { email: 'safety@roostline.test' });
  if (!safety) return;
  const lines = new Map((await em.find(Line, {})).map((l) => [l.name, l]));
  for (const p of demoPermissions(now)) {
    const line = lines.get(p.line);
    if (!line) continue;
    const { line: _name, ...fields } = p;
    em.create(LinePermission, { id: generateIdFromEntropySize(10), lineId: line.id, ...fields, createdById: safety.id, version: 1, createdAt: now, updatedAt: now });
  }
  await em.flush();
}

/**
 * Saves the demo mission as the demo planner, planned by the server's own planner over the assessed demo spans, and
 * has the demo safety officer authorise it. Returns the mission, or null (with a warning) when the demo data leaves
 * no route. Runs after the spans are assessed (seedDemoDecisions).
 */
export async function seedDemoMission(em: EntityManager, now = new Date()) {
  const [planner, safety] = await Promise.all([em.findOne(User, { email: 'planner@roostline.test' }), em.findOne(User, { email: 'safety@roostline.test' })]);
  if (!planner || !safety) return null;
  try {
    const saved = await createMission(em, planner, { ...DEMO_MISSION, departAt: demoDepartAt(now) });
    return await authoriseMission(em, safety, saved.id, saved.version);
  } catch (err) {
    console.warn(`The demo mission was not seeded: ${err instanceof Error ? err.message : String(err)}`);
    return null;
  }
}
