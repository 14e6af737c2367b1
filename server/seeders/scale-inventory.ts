// A large invented network for scale work (the bench, and browser journeys over thousands of spans): lines of the
// Harrow Vale Power Cooperative spread over a region that grows with the span count, denser around a few invented
// centres, with structures along each line, every span status, hazards on some spans and surveyed readings.
// Written with bulk prepared inserts in large transactions; deterministic (seeded PRNG).
import type { EntityManager } from '@mikro-orm/core';
import { DEMO_CENTER } from '#shared/demo-region.ts';
import { ACSR_CONDUCTORS } from '#shared/engineering/conductors.ts';
import { codeGroundClearanceM } from '#shared/engineering/clearance.ts';
import type { SpanStatus } from '#shared/schemas/inventory.ts';
import { prng } from '../../shared/prng.ts';
import { bulkInsert } from '../sql/bulk.ts';
import { isPostgres } from '../sql/dialect.ts';
import { DEFAULT_HAZARD_KINDS as HAZARD_KINDS } from '../modules/inventory/catalogues.ts';
import { spanLengthM } from '../modules/inventory/inventory.service.ts';

export interface ScaleSeedOptions {
  spans: number;
  /** Surveyor user ids the spans are shared between (round robin); none leaves surveyor_id empty. */
  surveyorIds?: string[];
  seed?: number;
  /** Called after each committed chunk with the spans written so far. */
  onProgress?: (spansWritten: number) => void;
}

export interface ScaleSeedResult {
  lines: number;
  structures: number;
  spans: number;
  hazards: number;
  /** [lon, lat] of the densest centre (where most lines start). */
  densest: [number, number];
  bbox: { west: number; south: number; east: number; north: number };
}

const CLASSES = [
  { kv: 12.47, spanM: [70, 130], kind: 'pole', height: [10, 13], codes: ['Penguin', 'Partridge'], load: [80, 260], share: 0.55 },
  { kv: 34.5, spanM: [110, 200], kind: 'pole', height: [12, 16], codes: ['Partridge', 'Linnet'], load: [150, 380], share: 0.2 },
  { kv: 69, spanM: [180, 280], kind: 'h-frame', height: [15, 19], codes: ['Linnet', 'Hawk', 'Dove'], load: [220, 480], share: 0.15 },
  { kv: 138, spanM: [260, 380], kind: 'tower', height: [24, 30], codes: ['Dove', 'Drake'], load: [300, 700], share: 0.1 },
] as const;

/** Share of each status (every status present, most spans approved). */
const STATUS_SHARES: [SpanStatus, number][] = [
  ['approved', 0.52],
  ['submitted', 0.14],
  ['draft', 0.14],
  ['returned', 0.12],
  ['suspended', 0.08],
];
const TERRAINS = ['open-field', 'road', 'forest', 'urban', 'water', 'rail'] as const;
const PHASES = ['top', 'outer-left', 'outer-right', 'middle'];
const DAY = 86_400_000;

const LINE_COLS = ['id', 'name', 'owner', 'voltage_kv', 'frequency_hz', 'phases', 'load_typical_a', 'load_min_a', 'load_peak_a', 'load_profile_a', 'version', 'created_at', 'updated_at'];
const STRUCTURE_COLS = ['id', 'line_id', 'lat', 'lon', 'kind', 'label', 'attachment_height_m', 'version', 'created_at', 'updated_at'];
const SPAN_COLS = [
  'id', 'line_id', 'from_structure_id', 'to_structure_id', 'status', 'version', 'length_m', 'conductor_code_word', 'conductor_size', 'conductor_material', 'conductor_diameter_mm',
  'conductor_resistance_low_ohm_per_m', 'conductor_temp_low_c', 'conductor_resistance_high_ohm_per_m', 'conductor_temp_high_c', 'phase_position', 'clearance_m', 'lowest_clearance_m',
  'terrain', 'load_current_a', 'survey_date', 'surveyor_id', 'return_reason', 'suspend_reason', 'submitted_at', 'approved_at', 'approved_by_id', 'created_at', 'updated_at',
];
const HAZARD_COLS = ['id', 'span_id', 'kind_id', 'severity', 'position_along_m', 'note', 'created_at'];

const pad = (n: number, w: number) => String(n).padStart(w, '0');

/** The region for a network of this size: the demo region's shape, scaled so density stays about the same. */
export function scaleRegion(spans: number) {
  const k = Math.max(1, Math.sqrt(spans / 10_000));
  const halfW = 0.3 * k;
  const halfH = 0.2 * k;
  return { west: DEMO_CENTER[0] - halfW, east: DEMO_CENTER[0] + halfW, south: DEMO_CENTER[1] - halfH, north: DEMO_CENTER[1] + halfH };
}

export async function seedScaleInventory(em: EntityManager, opts: ScaleSeedOptions): Promise<ScaleSeedResult> {
  const rand = prng(opts.seed ?? 16);
  const bbox = scaleRegion(opts.spans);
  const w = bbox.east - bbox.west;
  const h = bbox.north - bbox.south;
  // Centres: the first is the densest (a third of the lines start near it).
  const centres: [number, number][] = [[DEMO_CENTER[0], DEMO_CENTER[1]]];
  const extra = Math.max(5, Math.round(opts.spans / 25_000));
  for (let i = 0; i < extra; i++) centres.push([bbox.west + w * (0.1 + 0.8 * rand()), bbox.south + h * (0.1 + 0.8 * rand())]);
  const gauss = () => (rand() + rand() + rand() - 1.5) / 1.5;
  const now = Date.now();
  // Instants: epoch milliseconds in SQLite's integer columns, Date objects for PostgreSQL's timestamptz columns.
  const pg = isPostgres(em);
  const at = (ms: number | null) => (ms === null ? null : pg ? new Date(ms) : ms);
  const conductors = new Map(ACSR_CONDUCTORS.map((c) => [c.codeWord, c]));
  const surveyors = opts.surveyorIds ?? [];

  let lineNo = 0;
  let structureNo = 0;
  let spanNo = 0;
  let hazardNo = 0;
  let pending = { lines: [] as unknown[][], structures: [] as unknown[][], spans: [] as unknown[][], hazards: [] as unknown[][] };
  const flush = async () => {
    const p = pending;
    pending = { lines: [], structures: [], spans: [], hazards: [] };
    await bulkInsert(em, 'lines', LINE_COLS, p.lines);
    await bulkInsert(em, 'structures', STRUCTURE_COLS, p.structures);
    await bulkInsert(em, 'spans', SPAN_COLS, p.spans);
    await bulkInsert(em, 'hazards', HAZARD_COLS, p.hazards);
    opts.onProgress?.(spanNo);
  };

  while (spanNo < opts.spans) {
    const r = rand();
    let acc = 0;
    const cls = CLASSES.find((c) => (acc += c.share) >= r) ?? CLASSES[0];
    const lineId = `ln${pad(lineNo, 6)}`;
    const prefix = `C${pad(lineNo, 5)}`;
    lineNo++;
    const count = Math.min(opts.spans - spanNo, 60 + Math.floor(rand() * 340));
    const typical = Math.round(cls.load[0] + rand() * (cls.load[1] - cls.load[0]));
    pending.lines.push([
      lineId, `Harrow Vale circuit ${prefix} ${cls.kv} kV`, 'Harrow Vale Power Cooperative', cls.kv, 60, 3, typical, Math.round(typical * 0.45), Math.round(typical * 1.5), null, 1, at(now - 400 * DAY), at(now - 400 * DAY),
    ]);
    const centre = centres[rand() < 0.34 ? 0 : 1 + Math.floor(rand() * (centres.length - 1))];
    let lon = centre[0] + gauss() * w * 0.08;
    let lat = centre[1] + gauss() * h * 0.08;
    let heading = rand() * Math.PI * 2;
    const code = cls.codes[Math.floor(rand() * cls.codes.length)];
    const c = conductors.get(code)!;
    const minClear = codeGroundClearanceM(cls.kv);
    const ids: string[] = [];
    const pts: [number, number][] = [];
    for (let i = 0; i <= count; i++) {
      const id = `st${pad(structureNo++, 8)}`;
      ids.push(id);
      pts.push([lon, lat]);
      pending.structures.push([id, lineId, lat, lon, cls.kind, `${prefix}-${i + 1}`, cls.height[0] + rand() * (cls.height[1] - cls.height[0]), 1, at(now - 400 * DAY), at(now - 400 * DAY)]);
      const stepM = cls.spanM[0] + rand() * (cls.spanM[1] - cls.spanM[0]);
      heading += (rand() - 0.5) * 0.35;
      lon += (Math.cos(heading) * stepM) / (111_320 * Math.cos((lat * Math.PI) / 180));
      lat += (Math.sin(heading) * stepM) / 110_540;
      // Keep lines inside the region (turn back at its edge).
      if (lon < bbox.west || lon > bbox.east) (heading = Math.PI - heading), (lon = Math.min(bbox.east, Math.max(bbox.west, lon)));
      if (lat < bbox.south || lat > bbox.north) (heading = -heading), (lat = Math.min(bbox.north, Math.max(bbox.south, lat)));
    }
    for (let i = 0; i < count; i++) {
      const id = `sp${pad(spanNo, 8)}`;
      const rs = rand();
      let a = 0;
      const status = (STATUS_SHARES.find(([, s]) => (a += s) >= rs) ?? STATUS_SHARES[0])[0];
      const surveyed = status !== 'draft' || rand() < 0.6;
      const clearance = surveyed ? Math.round((minClear - 1 + rand() * 8) * 100) / 100 : null;
      const ownLoad = rand() < 0.25 ? Math.round(typical * (0.7 + rand() * 0.6)) : null;
      const ownResistance = rand() < 0.2;
      const surveyDay = now - Math.floor(rand() * 1500) * DAY;
      const updated = now - Math.floor(rand() * 300) * DAY - Math.floor(rand() * DAY);
      const surveyor = surveyors.length ? surveyors[spanNo % surveyors.length] : null;
      pending.spans.push([
        id, lineId, ids[i], ids[i + 1], status, 1, spanLengthM({ lon: pts[i][0], lat: pts[i][1] }, { lon: pts[i + 1][0], lat: pts[i + 1][1] }),
        code, c.size, 'ACSR', surveyed || rand() < 0.5 ? c.diameterMm : null,
        ownResistance ? c.resistanceAc25OhmPerM * 1.01 : null, ownResistance ? 25 : null, ownResistance ? c.resistanceAc75OhmPerM * 1.01 : null, ownResistance ? 75 : null,
        surveyed ? PHASES[i % PHASES.length] : null, clearance, clearance === null ? null : Math.round((clearance - rand() * 0.8) * 100) / 100,
        surveyed ? TERRAINS[Math.floor(rand() * TERRAINS.length)] : null, ownLoad, surveyed ? new Date(surveyDay).toISOString().slice(0, 10) : null, surveyor,
        status === 'returned' ? 'Clearance reading needs a second measurement' : null, status === 'suspended' ? 'Vegetation work planned on this section' : null,
        at(status === 'draft' ? null : updated - DAY), at(status === 'approved' || status === 'suspended' ? updated : null), null, at(updated - 30 * DAY), at(updated),
      ]);
      const hz = rand();
      const nHazards = hz < 0.03 ? 2 : hz < 0.15 ? 1 : 0;
      for (let k = 0; k < nHazards; k++) {
        const kind = HAZARD_KINDS[Math.floor(rand() * HAZARD_KINDS.length)];
        pending.hazards.push([`hz${pad(hazardNo++, 8)}`, id, kind.id, kind.defaultSeverity, Math.round(rand() * 100), '', at(updated)]);
      }
      spanNo++;
    }
    if (pending.spans.length >= 20_000) await flush();
  }
  await flush();
  return { lines: lineNo, structures: structureNo, spans: spanNo, hazards: hazardNo, densest: centres[0], bbox };
}
