// The demo line inventory: the invented Harrow Vale Power Cooperative in the invented Harrow Vale region.
// Everything here is made up by this code (names, routes, loads, readings); a seeded PRNG keeps it the same every run.
import type { EntityManager } from '@mikro-orm/sqlite';
import { DEMO_BBOX, DEMO_TOWNS } from '#shared/demo-region.ts';
import { codeGroundClearanceM } from '#shared/engineering/clearance.ts';
import { findConductor } from '#shared/engineering/conductors.ts';
import type { HazardSeverityLevel, SpanStatus, StructureKind, Terrain } from '#shared/schemas/inventory.ts';
import { User } from '../modules/auth/user.entity.ts';
import { Hazard } from '../modules/inventory/hazard.entity.ts';
import { Line } from '../modules/inventory/line.entity.ts';
import { Span } from '../modules/inventory/span.entity.ts';
import { Structure } from '../modules/inventory/structure.entity.ts';
import { spanLengthM } from '../modules/inventory/inventory.service.ts';
import { prng } from '../../shared/prng.ts';

export const DEMO_OWNER = 'Harrow Vale Power Cooperative';

const ID_ALPHABET = 'abcdefghijklmnopqrstuvwxyz234567';

interface DemoLineSpec {
  name: string;
  labelPrefix: string;
  voltageKv: number;
  /** Town ids the line runs through, in order. */
  via: string[];
  /** Typical span length, m. */
  spanM: number;
  structureKind: StructureKind;
  attachmentHeightM: [number, number];
  load: { typicalA: number; minA: number; peakA: number; shape: 'residential' | 'commercial' | 'industrial' };
  /** Code words along the route (the route is split into equal sections). */
  conductors: string[];
  /** Typical ground clearance at the perch point, m (min, max). */
  clearanceM: [number, number];
}

export const DEMO_LINES: DemoLineSpec[] = [
  {
    name: 'Vale Ridge 138 kV',
    labelPrefix: 'VR138',
    voltageKv: 138,
    via: ['skelloway-end', 'wendlecross', 'pellowby'],
    spanM: 320,
    structureKind: 'tower',
    attachmentHeightM: [24, 30],
    load: { typicalA: 430, minA: 210, peakA: 660, shape: 'industrial' },
    conductors: ['Drake'],
    clearanceM: [9.5, 15],
  },
  {
    name: 'Ostlemere–Thrumbeck 69 kV',
    labelPrefix: 'OT69',
    voltageKv: 69,
    via: ['ostlemere', 'wendlecross', 'thrumbeck-green'],
    spanM: 230,
    structureKind: 'h-frame',
    attachmentHeightM: [15, 19],
    load: { typicalA: 270, minA: 120, peakA: 440, shape: 'commercial' },
    conductors: ['Linnet', 'Hawk', 'Dove'],
    clearanceM: [7.5, 11.5],
  },
  {
    name: 'Wendlecross Feeder 4',
    labelPrefix: 'WX4',
    voltageKv: 12.47,
    via: ['wendlecross', 'quarnock-halt'],
    spanM: 95,
    structureKind: 'pole',
    attachmentHeightM: [10.5, 12.5],
    load: { typicalA: 160, minA: 55, peakA: 250, shape: 'residential' },
    conductors: ['Penguin', 'Partridge'],
    clearanceM: [6.0, 8.2],
  },
  {
    name: 'Skelloway End Feeder 1',
    labelPrefix: 'SE1',
    voltageKv: 12.47,
    via: ['skelloway-end', 'thrumbeck-green'],
    spanM: 110,
    structureKind: 'pole',
    attachmentHeightM: [10, 12],
    load: { typicalA: 120, minA: 40, peakA: 205, shape: 'residential' },
    conductors: ['Partridge'],
    clearanceM: [6.0, 8.0],
  },
];

/** Only the first part of the longer routes is surveyed so far; this caps each line's span count. */
const MAX_SPANS_PER_LINE: Record<string, number> = { VR138: 110, OT69: 120, WX4: 120, SE1: 60 };

/** Hourly shape 0..1 (00:00 … 23:00) of each load kind: invented, typical-looking daily curves. */
function loadShape(kind: DemoLineSpec['load']['shape'], h: number): number {
  const g = (mu: number, sigma: number) => Math.exp(-((h - mu) ** 2) / (2 * sigma ** 2));
  if (kind === 'residential') return Math.min(1, 0.1 + 0.5 * g(7.5, 1.6) + 0.9 * g(19, 2.2));
  if (kind === 'commercial') return Math.min(1, 0.05 + 0.95 * g(13.5, 3.6));
  return Math.min(1, 0.45 + 0.55 * g(11, 4.5));
}

export function demoLoadProfile(load: DemoLineSpec['load']): number[] {
  return Array.from({ length: 24 }, (_, h) => Math.round(load.minA + (load.peakA - load.minA) * loadShape(load.shape, h)));
}

const RETURN_REASONS = [
  'The clearance at the perch point was measured at the structure, not mid-span; measure again under the conductor.',
  'Conductor code word does not match the line records for this section; check the tag on the structure.',
  'No photo of the vegetation on the north side; add one before resubmitting.',
  'Lowest clearance is missing its location; note where along the span it was measured.',
  'Hazard list omits the farm track crossing shown on the access plan.',
];
const SUSPEND_REASONS = [
  'Crossing circuit below is being rebuilt this month; no perching until the works end.',
  'Vegetation reported touching the outer phase after the storm; awaiting the clearing crew.',
  'Landowner withdrew access for the ground crew pending a new agreement.',
  'Bird diverters being replaced along this span; perching suspended until they are back.',
];
const HAZARD_NOTES: Record<string, string[]> = {
  'vegetation-encroachment': ['Eucalypt crowns within 3 m of the outer phase', 'Regrowth under the span, last cleared two seasons ago', 'Pine windbreak along the south side'],
  'road-crossing': ['Sealed district road, school bus route', 'Gravel farm road with hay trucks at harvest', 'Highway crossing, verge parking'],
  'rail-crossing': ['Single-track freight line, occasional night trains'],
  'water-crossing': ['Creek with flood debris on the banks', 'Irrigation channel, wet approach for the ground crew'],
  'crossing-circuit': ['Distribution circuit passes underneath at mid-span', 'Telecom aerial cable crosses under the span'],
  'spacer-or-damper': ['Vibration dampers near both structures', 'Stockbridge dampers 1.5 m out from the clamps'],
  'marker-ball-or-bird-diverter': ['Spiral bird diverters every 10 m on the top phase', 'Marker balls on the shield wire over the creek'],
  'nearby-structure': ['Machinery shed 15 m from the centre line', 'Water tower beside the second structure'],
  'public-access': ['Walking trail passes under the span', 'Picnic reserve next to the structure'],
};

function interpolateRoute(points: [number, number][], stepM: number, rnd: () => number): [number, number][] {
  // Walks the polyline (lon, lat) in steps of about stepM (±12 %), with a small sideways wander.
  const out: [number, number][] = [points[0]!];
  for (let i = 1; i < points.length; i++) {
    const [lon0, lat0] = points[i - 1]!;
    const [lon1, lat1] = points[i]!;
    const segM = spanLengthM({ lat: lat0, lon: lon0 }, { lat: lat1, lon: lon1 });
    let travelled = 0;
    while (true) {
      const step = stepM * (0.88 + 0.24 * rnd());
      travelled += step;
      if (travelled >= segM - stepM * 0.5) break;
      const f = travelled / segM;
      const wander = (rnd() - 0.5) * 0.0004;
      out.push([lon0 + (lon1 - lon0) * f + wander * (lat1 - lat0 >= 0 ? 1 : -1) * 0.5, lat0 + (lat1 - lat0) * f + wander]);
    }
    out.push([lon1, lat1]);
  }
  return out;
}

function pick<T>(rnd: () => number, list: readonly T[]): T {
  return list[Math.floor(rnd() * list.length)]!;
}

function weighted<T>(rnd: () => number, items: readonly [T, number][]): T {
  const total = items.reduce((s, [, w]) => s + w, 0);
  let r = rnd() * total;
  for (const [v, w] of items) {
    r -= w;
    if (r <= 0) return v;
  }
  return items[items.length - 1]![0];
}

const TERRAIN_HAZARD: Partial<Record<Terrain, string>> = { road: 'road-crossing', rail: 'rail-crossing', water: 'water-crossing', forest: 'vegetation-encroachment', urban: 'public-access' };
const OTHER_HAZARDS = ['vegetation-encroachment', 'crossing-circuit', 'spacer-or-damper', 'marker-ball-or-bird-diverter', 'nearby-structure', 'public-access'];
const DEFAULT_SEVERITY: Record<string, HazardSeverityLevel> = {
  'vegetation-encroachment': 'medium',
  'road-crossing': 'medium',
  'rail-crossing': 'high',
  'water-crossing': 'medium',
  'crossing-circuit': 'high',
  'spacer-or-damper': 'low',
  'marker-ball-or-bird-diverter': 'medium',
  'nearby-structure': 'low',
  'public-access': 'medium',
};

export interface DemoInventoryResult {
  lines: number;
  structures: number;
  spans: number;
  hazards: number;
  byStatus: Record<SpanStatus, number>;
}

/** Seeds the demo inventory (after the demo users). Deterministic; bulk inserts. */
export async function seedDemoInventory(em: EntityManager, seed = 20261202): Promise<DemoInventoryResult> {
  const rnd = prng(seed);
  const id = () => Array.from({ length: 16 }, () => ID_ALPHABET[Math.floor(rnd() * 32)]).join('');
  const surveyor = await em.findOne(User, { email: 'surveyor@roostline.test' });
  const safety = await em.findOne(User, { email: 'safety@roostline.test' });
  const towns = new Map(DEMO_TOWNS.map((t) => [t.id, t]));
  const byStatus: Record<SpanStatus, number> = { draft: 0, submitted: 0, approved: 0, returned: 0, suspended: 0 };
  let structureCount = 0;
  let spanCount = 0;
  let hazardCount = 0;
  const base = Date.UTC(2026, 2, 2); // surveys from March 2026
  // Plain rows inserted in bulk (em.insertMany): several times faster than the unit of work for ~1300 rows.
  const lines: Line[] = [];
  const structureRows: Structure[] = [];
  const spanRows: Span[] = [];
  const hazardRows: Hazard[] = [];
  const push = <T>(list: T[], row: T): T => {
    list.push(row);
    return row;
  };

  for (const spec of DEMO_LINES) {
    const created = new Date(base - 30 * 86_400_000);
    const line = push(lines, {
      id: id(),
      name: spec.name,
      owner: DEMO_OWNER,
      voltageKv: spec.voltageKv,
      frequencyHz: 60,
      phases: 3,
      loadTypicalA: spec.load.typicalA,
      loadMinA: spec.load.minA,
      loadPeakA: spec.load.peakA,
      loadProfileA: demoLoadProfile(spec.load),
      version: 1,
      createdAt: created,
      updatedAt: created,
    });
    const route = spec.via.map((t) => [towns.get(t)!.lon, towns.get(t)!.lat] as [number, number]);
    const points = interpolateRoute(route, spec.spanM, rnd)
      .slice(0, MAX_SPANS_PER_LINE[spec.labelPrefix]! + 1)
      .map(([lon, lat]) => [Math.min(DEMO_BBOX.east, Math.max(DEMO_BBOX.west, lon)), Math.min(DEMO_BBOX.north, Math.max(DEMO_BBOX.south, lat))] as [number, number]);
    const structures = points.map(([lon, lat], i) => {
      const [h0, h1] = spec.attachmentHeightM;
      return push(structureRows, {
        id: id(),
        lineId: line.id,
        lat: Math.round(lat * 1e7) / 1e7,
        lon: Math.round(lon * 1e7) / 1e7,
        kind: i > 0 && i % 17 === 0 && spec.structureKind === 'pole' ? 'h-frame' : spec.structureKind,
        label: `${spec.labelPrefix}-${String(i + 1).padStart(3, '0')}`,
        attachmentHeightM: Math.round((h0 + (h1 - h0) * rnd()) * 10) / 10,
        version: 1,
        createdAt: created,
        updatedAt: created,
      });
    });
    structureCount += structures.length;
    const codeMinM = codeGroundClearanceM(spec.voltageKv);
    const n = structures.length - 1;
    for (let i = 0; i < n; i++) {
      const from = structures[i]!;
      const to = structures[i + 1]!;
      const codeWord = spec.conductors[Math.min(spec.conductors.length - 1, Math.floor((i / n) * spec.conductors.length))]!;
      const c = findConductor(codeWord)!;
      const terrain = weighted<Terrain>(rnd, [
        ['open-field', 50],
        ['forest', 14],
        ['road', 12],
        ['urban', spec.voltageKv < 20 ? 14 : 4],
        ['water', 5],
        ['rail', 2],
        ['other', 3],
      ]);
      // About one span in 14 was measured below the code minimum for its voltage class, so the clearance gate fails.
      const belowCode = rnd() < 1 / 14;
      const [c0, c1] = spec.clearanceM;
      const clearanceM = Math.round((belowCode ? codeMinM - 0.2 - rnd() * 0.9 : c0 + (c1 - c0) * rnd()) * 100) / 100;
      const lowestClearanceM = Math.round((clearanceM - rnd() * 1.1) * 100) / 100;
      const status = weighted<SpanStatus>(rnd, [
        ['approved', 56],
        ['submitted', 15],
        ['draft', 12],
        ['returned', 10],
        ['suspended', 7],
      ]);
      byStatus[status] += 1;
      const surveyDay = Math.floor(rnd() * 250);
      const surveyAt = new Date(base + surveyDay * 86_400_000);
      const submittedAt = status === 'draft' ? null : new Date(surveyAt.getTime() + (1 + Math.floor(rnd() * 4)) * 86_400_000);
      const approvedAt = status === 'approved' || status === 'suspended' ? new Date(submittedAt!.getTime() + (1 + Math.floor(rnd() * 6)) * 86_400_000) : null;
      const updatedAt = approvedAt ?? submittedAt ?? surveyAt;
      // A draft in progress may still lack its clearance readings.
      const incompleteDraft = status === 'draft' && rnd() < 0.35;
      const span = push(spanRows, {
        id: id(),
        lineId: line.id,
        fromStructureId: from.id,
        toStructureId: to.id,
        status,
        version: status === 'draft' ? 1 : status === 'submitted' ? 2 : status === 'returned' || status === 'approved' ? 3 : 4,
        lengthM: spanLengthM(from, to),
        conductorCodeWord: c.codeWord,
        conductorSize: `${c.size} ${c.stranding}`,
        conductorMaterial: 'ACSR',
        conductorDiameterMm: c.diameterMm,
        conductorResistanceLowOhmPerM: c.resistanceAc25OhmPerM,
        conductorTempLowC: 25,
        conductorResistanceHighOhmPerM: c.resistanceAc75OhmPerM,
        conductorTempHighC: 75,
        phasePosition: pick(rnd, spec.voltageKv < 20 ? ['A (left)', 'B (centre)', 'C (right)'] : ['A (top)', 'B (middle)', 'C (bottom)']),
        clearanceM: incompleteDraft ? null : clearanceM,
        lowestClearanceM: incompleteDraft ? null : lowestClearanceM,
        // Lowest point near mid-span, where the sag is deepest (common practice); derived so the seeded sequence stays as it was.
        lowestClearanceAlongM: incompleteDraft ? null : Math.round(spanLengthM(from, to) * (0.42 + ((lowestClearanceM * 100) % 17) / 100)),
        terrain,
        // One span in eight has its own load estimate (a tap or a tie point changes the current).
        loadCurrentA: rnd() < 1 / 8 ? Math.round(spec.load.typicalA * (0.7 + 0.5 * rnd())) : null,
        surveyDate: surveyAt.toISOString().slice(0, 10),
        surveyorId: surveyor?.id ?? null,
        returnReason: status === 'returned' ? pick(rnd, RETURN_REASONS) : null,
        suspendReason: status === 'suspended' ? pick(rnd, SUSPEND_REASONS) : null,
        submittedAt,
        approvedAt,
        approvedById: approvedAt ? (safety?.id ?? null) : null,
        createdAt: surveyAt,
        updatedAt,
      });
      spanCount += 1;
      const kinds = new Set<string>();
      const terrainKind = TERRAIN_HAZARD[terrain];
      if (terrainKind) kinds.add(terrainKind);
      const extra = weighted<number>(rnd, [
        [0, 45],
        [1, 35],
        [2, 15],
        [3, 5],
      ]);
      for (let k = 0; k < extra; k++) kinds.add(pick(rnd, OTHER_HAZARDS));
      for (const kindId of kinds) {
        const severity = rnd() < 0.2 ? weighted<HazardSeverityLevel>(rnd, [['low', 1], ['medium', 1], ['high', 1]]) : DEFAULT_SEVERITY[kindId]!;
        push(hazardRows, {
          id: id(),
          spanId: span.id,
          kindId,
          severity,
          positionAlongM: rnd() < 0.8 ? Math.round(span.lengthM * (0.1 + 0.8 * rnd())) : null,
          note: pick(rnd, HAZARD_NOTES[kindId] ?? ['']),
          createdAt: surveyAt,
        });
        hazardCount += 1;
      }
    }
  }
  await em.insertMany(Line, lines);
  for (const list of [structureRows, spanRows, hazardRows] as const) {
    for (let i = 0; i < list.length; i += 400) await em.insertMany(list === structureRows ? Structure : list === spanRows ? Span : Hazard, list.slice(i, i + 400) as any[]);
  }
  return { lines: DEMO_LINES.length, structures: structureCount, spans: spanCount, hazards: hazardCount, byStatus };
}
