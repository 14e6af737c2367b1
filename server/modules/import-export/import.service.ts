// Import of a line inventory: a plan row by row (create / update / unchanged / refuse, with reasons), then an
// all-or-nothing commit in one transaction. Records are matched by stable keys: a line by name, a structure by
// line + label, a span by line + its two structure labels (either direction), so a re-import updates.
import type { EntityManager } from '@mikro-orm/core';
import type { z } from 'zod';
import {
  lineCreateSchema,
  lineUpdateSchema,
  spanUpdateSchema,
  structureCreateSchema,
  type ImportFormat,
  type ImportReport,
  type ImportRowReport,
} from '#shared/schemas/inventory.ts';
import { AppError } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import { AuditEntry } from '../audit/audit.entity.ts';
import type { User } from '../auth/user.entity.ts';
import { ConductorType } from '../inventory/conductor-type.entity.ts';
import { Hazard } from '../inventory/hazard.entity.ts';
import { HazardKind } from '../inventory/hazard-kind.entity.ts';
import { Line } from '../inventory/line.entity.ts';
import { Span } from '../inventory/span.entity.ts';
import { Structure } from '../inventory/structure.entity.ts';
import { chunks, lineSnapshot, newId, notifySpanChanged, spanLengthM, spanSnapshot, structureSnapshot } from '../inventory/inventory.service.ts';
import { sameHazards, unlinkPhotosFromHazards, type ConductorFields, type HazardRecord } from '../inventory/spans.service.ts';
import { csvFieldName, geojsonFieldName, parseCsv, parseGeoJson, type FieldNamer, type RawRow } from './formats.ts';

const LAT_LON_TOLERANCE_DEG = 1e-9;
const structurePartialSchema = structureCreateSchema.partial();

type LineFields = Pick<Line, 'owner' | 'voltageKv' | 'frequencyHz' | 'phases' | 'loadTypicalA' | 'loadMinA' | 'loadPeakA' | 'loadProfileA'>;
type StructureFields = Pick<Structure, 'lat' | 'lon' | 'kind' | 'attachmentHeightM'>;
type SpanFields = ConductorFields &
  Pick<
  Span,
  | 'phasePosition'
  | 'clearanceM'
  | 'lowestClearanceM'
  | 'lowestClearanceAlongM'
  | 'terrain'
  | 'loadCurrentA'
  | 'surveyDate'
>;

interface PlannedLine {
  key: string;
  /** The row whose data creates this new line. */
  createdByRow?: number;
  existing: Line | null;
  fields: LineFields;
  /** Row that first set each field, for conflicts inside the file. */
  setBy: Map<string, number>;
  changed: Set<string>;
}
interface PlannedStructure {
  key: string;
  lineKey: string;
  label: string;
  existing: Structure | null;
  fields: StructureFields;
  setBy: Map<string, number>;
  changed: Set<string>;
}
interface PlannedSpan {
  key: string;
  lineKey: string;
  fromKey: string;
  toKey: string;
  existing: Span | null;
  fields: SpanFields;
  hazards: HazardRecord[];
  existingHazards: Hazard[];
  hazardsChanged: boolean;
  changed: Set<string>;
  setByRow: number;
}

export interface ImportPlan {
  report: ImportReport;
  lines: Map<string, PlannedLine>;
  structures: Map<string, PlannedStructure>;
  spans: Map<string, PlannedSpan>;
}

export function detectFormat(text: string, filename?: string, explicit?: ImportFormat): ImportFormat {
  if (explicit) return explicit;
  const name = (filename ?? '').toLowerCase();
  if (name.endsWith('.csv')) return 'csv';
  if (name.endsWith('.geojson') || name.endsWith('.json')) return 'geojson';
  return /^\s*[{[]/.test(text) ? 'geojson' : 'csv';
}

export const structureKey = (lineKey: string, label: string) => `${lineKey}\u0000${label}`;
export const spanKeyOf = (lineKey: string, a: string, b: string) => `${lineKey}\u0000${[a, b].sort().join('\u0000')}`;

function issuesOf(error: z.ZodError, record: Parameters<FieldNamer>[0], name: FieldNamer): string[] {
  return error.issues.map((i) => `${name(record, i.path.map(String).join('.'))}: ${i.message}`);
}

function eq(a: unknown, b: unknown) {
  if (typeof a === 'number' && typeof b === 'number') return Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a), Math.abs(b));
  return JSON.stringify(a) === JSON.stringify(b);
}

/** Builds the plan; writes nothing. */
export async function planImport(em: EntityManager, format: ImportFormat, text: string): Promise<ImportPlan> {
  const rows = format === 'csv' ? parseCsv(text) : parseGeoJson(text);
  const name = format === 'csv' ? csvFieldName : geojsonFieldName;

  const lineNames = [...new Set(rows.map((r) => r.line?.name).filter((n): n is string => !!n))];
  const dbLines = lineNames.length ? await em.find(Line, { name: { $in: lineNames } }) : [];
  const dbLineByName = new Map(dbLines.map((l) => [l.name, l]));
  const dbLineIds = dbLines.map((l) => l.id);
  const dbStructures = dbLineIds.length ? await em.find(Structure, { lineId: { $in: dbLineIds } }) : [];
  const dbStructureByKey = new Map(dbStructures.map((s) => [structureKey(dbLines.find((l) => l.id === s.lineId)!.name, s.label), s]));
  const dbStructureById = new Map(dbStructures.map((s) => [s.id, s]));
  const dbSpans = dbLineIds.length ? await em.find(Span, { lineId: { $in: dbLineIds } }) : [];
  const dbSpanByKey = new Map<string, Span>();
  for (const sp of dbSpans) {
    const line = dbLines.find((l) => l.id === sp.lineId)!;
    const a = dbStructureById.get(sp.fromStructureId)?.label;
    const b = dbStructureById.get(sp.toStructureId)?.label;
    if (a && b) dbSpanByKey.set(spanKeyOf(line.name, a, b), sp);
  }
  const dbHazards: Hazard[] = [];
  for (const c of chunks(dbSpans.map((s) => s.id), 500)) dbHazards.push(...(await em.find(Hazard, { spanId: { $in: c } })));
  const kinds = new Map((await em.find(HazardKind, {})).map((k) => [k.id, k]));
  const catalogue = new Map((await em.find(ConductorType, {})).map((c) => [c.codeWord.toLowerCase(), c]));

  const plan: ImportPlan = {
    report: { format, committed: false, rows: [], summary: { create: 0, update: 0, unchanged: 0, refuse: 0 } },
    lines: new Map(),
    structures: new Map(),
    spans: new Map(),
  };

  // Rows that only wait for a record a later row defines (a Point before the LineString that names its line,
  // a span before the Points of its structures) are evaluated again after the others.
  // New lines first, each from the first row that describes it fully, so rows naming only the line (structure Points) can use it.
  planNewLines(rows, dbLineByName, plan);
  const lookups = { dbLineByName, dbStructureByKey, dbSpanByKey, hazardsBySpan: groupHazards(dbHazards), kinds, catalogue };
  const final = new Map<number, ImportRowReport>();
  let pending = rows;
  for (;;) {
    const deferred: { raw: RawRow; report: ImportRowReport }[] = [];
    for (const raw of pending) {
      const { report, waiting } = evaluateRow(raw, plan, name, lookups);
      if (waiting) deferred.push({ raw, report });
      else final.set(raw.row, report);
    }
    if (!deferred.length) break;
    if (deferred.length === pending.length) {
      for (const d of deferred) final.set(d.raw.row, d.report);
      break;
    }
    pending = deferred.map((d) => d.raw);
  }
  plan.report.rows = rows.map((r) => final.get(r.row)!);
  for (const r of plan.report.rows) plan.report.summary[r.action] += 1;
  return plan;
}

/** Plans a new line for each line name not in the database, from the first row that describes it fully. */
export function planNewLines(rows: RawRow[], dbLineByName: ReadonlyMap<string, unknown>, plan: ImportPlan): void {
  for (const raw of rows) {
    if (!raw.line || raw.reasons.length || dbLineByName.has(raw.line.name) || plan.lines.has(raw.line.name)) continue;
    const given = Object.fromEntries(Object.entries(raw.line.given).filter(([, v]) => v !== undefined));
    const parsed = lineCreateSchema.safeParse({ name: raw.line.name, ...given });
    if (!parsed.success) continue;
    const v = parsed.data;
    plan.lines.set(raw.line.name, {
      key: raw.line.name,
      existing: null,
      fields: { owner: v.owner, voltageKv: v.voltageKv, frequencyHz: v.frequencyHz, phases: v.phases, loadTypicalA: v.loadTypicalA, loadMinA: v.loadMinA, loadPeakA: v.loadPeakA, loadProfileA: v.loadProfileA ?? null },
      setBy: new Map(Object.keys(given).map((k) => [k, raw.row])),
      changed: new Set(),
      createdByRow: raw.row,
    });
  }
}

export function groupHazards(hazards: Hazard[], into = new Map<string, Hazard[]>()): Map<string, Hazard[]> {
  for (const h of hazards) {
    const list = into.get(h.spanId);
    if (list) list.push(h);
    else into.set(h.spanId, [h]);
  }
  return into;
}

export interface Lookups {
  dbLineByName: Map<string, Line>;
  dbStructureByKey: Map<string, Structure>;
  dbSpanByKey: Map<string, Span>;
  hazardsBySpan: Map<string, Hazard[]>;
  kinds: Map<string, HazardKind>;
  catalogue: Map<string, ConductorType>;
}

/** Evaluates one row against the plan so far; the row's changes join the plan only when it is not refused. */
export function evaluateRow(raw: RawRow, plan: ImportPlan, name: FieldNamer, db: Lookups): { report: ImportRowReport; waiting: boolean } {
  const reasons = [...raw.reasons];
  const changes: string[] = [];
  const records: NonNullable<ImportRowReport['records']> = [];
  const staged: (() => void)[] = [];
  let waiting = false;
  const refuse = () => ({ report: { row: raw.row, action: 'refuse' as const, subject: raw.subject, reasons, records: [] }, waiting });
  if (reasons.length || !raw.line) return refuse();

  // ---- line ----
  const lineKey = raw.line.name;
  const given = Object.fromEntries(Object.entries(raw.line.given).filter(([, v]) => v !== undefined));
  let pl = plan.lines.get(lineKey);
  const existingLine = pl?.existing ?? db.dbLineByName.get(lineKey) ?? null;
  let lineAction: 'create' | 'update' | 'unchanged' = 'unchanged';
  let newLine: PlannedLine | null = null;
  if (!pl && !existingLine) {
    waiting = Object.keys(given).length === 0;
    const parsed = lineCreateSchema.safeParse({ name: lineKey, ...given });
    if (!parsed.success) {
      reasons.push(...issuesOf(parsed.error, 'line', name).map((r) => `${r} (the line "${lineKey}" is new)`));
      return refuse();
    }
    const v = parsed.data;
    newLine = {
      key: lineKey,
      existing: null,
      fields: { owner: v.owner, voltageKv: v.voltageKv, frequencyHz: v.frequencyHz, phases: v.phases, loadTypicalA: v.loadTypicalA, loadMinA: v.loadMinA, loadPeakA: v.loadPeakA, loadProfileA: v.loadProfileA ?? null },
      setBy: new Map(Object.keys(given).map((k) => [k, raw.row])),
      changed: new Set(),
    };
    lineAction = 'create';
    staged.push(() => plan.lines.set(lineKey, newLine!));
  } else {
    const parsed = lineUpdateSchema.safeParse({ ...given, version: 1 });
    if (!parsed.success) {
      reasons.push(...issuesOf(parsed.error, 'line', name));
      return refuse();
    }
    const base: PlannedLine = pl ?? {
      key: lineKey,
      existing: existingLine,
      fields: {
        owner: existingLine!.owner,
        voltageKv: existingLine!.voltageKv,
        frequencyHz: existingLine!.frequencyHz,
        phases: existingLine!.phases,
        loadTypicalA: existingLine!.loadTypicalA,
        loadMinA: existingLine!.loadMinA,
        loadPeakA: existingLine!.loadPeakA,
        loadProfileA: existingLine!.loadProfileA,
      },
      setBy: new Map(),
      changed: new Set(),
    };
    const updates: Partial<LineFields> = {};
    for (const [k, v] of Object.entries(parsed.data)) {
      if (k === 'version' || v === undefined) continue;
      const current = (base.fields as any)[k];
      if (eq(current, v)) continue;
      const by = base.setBy.get(k);
      if (by !== undefined) {
        reasons.push(`${name('line', k)}: differs from row ${by} of this file for the line "${lineKey}"`);
        continue;
      }
      (updates as any)[k] = v;
    }
    if (reasons.length) return refuse();
    const merged = { ...base.fields, ...updates };
    if (merged.loadMinA > merged.loadTypicalA) reasons.push(`${name('line', 'loadMinA')}: the minimum load cannot be above the typical load`);
    if (merged.loadTypicalA > merged.loadPeakA) reasons.push(`${name('line', 'loadPeakA')}: the peak load cannot be below the typical load`);
    if (reasons.length) return refuse();
    if (Object.keys(updates).length) {
      lineAction = base.existing ? 'update' : 'unchanged';
      changes.push(`line ${lineKey}: ${Object.keys(updates).map((k) => name('line', k)).join(', ')}`);
    }
    staged.push(() => {
      Object.assign(base.fields, updates);
      for (const k of Object.keys(given)) if (!base.setBy.has(k)) base.setBy.set(k, raw.row);
      for (const k of Object.keys(updates)) if (base.existing) base.changed.add(k);
      plan.lines.set(lineKey, base);
    });
    pl = base;
  }
  if (pl?.createdByRow === raw.row) lineAction = 'create';
  records.push({ type: 'line', action: lineAction, key: lineKey });

  // ---- structures ----
  const stagedStructures = new Map<string, PlannedStructure>();
  for (const st of raw.structures) {
    const key = structureKey(lineKey, st.label);
    const givenSt = Object.fromEntries(Object.entries(st.given).filter(([, v]) => v !== undefined));
    const prior = stagedStructures.get(key) ?? plan.structures.get(key);
    const existing = prior?.existing ?? (newLine ? null : db.dbStructureByKey.get(key)) ?? null;
    if (!prior && !existing) {
      const parsed = structureCreateSchema.safeParse({ lineId: 'import', label: st.label, ...givenSt });
      if (!parsed.success && parsed.error.issues.every((i) => givenSt[String(i.path[0])] === undefined)) waiting = true;
      if (!parsed.success) {
        reasons.push(...issuesOf(parsed.error, st.role, name).map((r) => `${r} (structure "${st.label}" is new)`));
        continue;
      }
      const v = parsed.data;
      const ps: PlannedStructure = {
        key,
        lineKey,
        label: st.label,
        existing: null,
        fields: { lat: v.lat, lon: v.lon, kind: v.kind, attachmentHeightM: v.attachmentHeightM },
        setBy: new Map(Object.keys(givenSt).map((k) => [k, raw.row])),
        changed: new Set(),
      };
      stagedStructures.set(key, ps);
      records.push({ type: 'structure', action: 'create', key: st.label });
      continue;
    }
    const parsed = structurePartialSchema.safeParse(givenSt);
    if (!parsed.success) {
      reasons.push(...issuesOf(parsed.error, st.role, name));
      continue;
    }
    const base: PlannedStructure = prior
      ? { ...prior, fields: { ...prior.fields }, setBy: new Map(prior.setBy), changed: new Set(prior.changed) }
      : { key, lineKey, label: st.label, existing: existing!, fields: { lat: existing!.lat, lon: existing!.lon, kind: existing!.kind, attachmentHeightM: existing!.attachmentHeightM }, setBy: new Map(), changed: new Set() };
    const updated: string[] = [];
    for (const k of ['lat', 'lon', 'kind', 'attachmentHeightM'] as const) {
      const v = (parsed.data as any)[k];
      if (v === undefined) continue;
      const same = k === 'lat' || k === 'lon' ? Math.abs((base.fields as any)[k] - v) <= LAT_LON_TOLERANCE_DEG : eq((base.fields as any)[k], v);
      if (!same) {
        const by = base.setBy.get(k);
        if (by !== undefined) {
          reasons.push(`${name(st.role, k)}: differs from row ${by} of this file for structure "${st.label}"`);
          continue;
        }
        (base.fields as any)[k] = v;
        if (base.existing) base.changed.add(k);
        updated.push(k);
      }
      if (!base.setBy.has(k)) base.setBy.set(k, raw.row);
    }
    stagedStructures.set(key, base);
    const action = !base.existing ? (prior ? 'unchanged' : 'create') : updated.length ? 'update' : 'unchanged';
    if (updated.length) changes.push(`structure ${st.label}: ${updated.map((k) => name(st.role, k)).join(', ')}`);
    records.push({ type: 'structure', action, key: st.label });
  }
  if (reasons.length) return refuse();

  // ---- span ----
  if (raw.span) {
    const sp = raw.span;
    if (sp.fromLabel === sp.toLabel) {
      reasons.push(`${name('span', 'toStructureId')}: a span needs two different structures`);
      return refuse();
    }
    const fromKey = structureKey(lineKey, sp.fromLabel);
    const toKey = structureKey(lineKey, sp.toLabel);
    const from = stagedStructures.get(fromKey) ?? plan.structures.get(fromKey);
    const to = stagedStructures.get(toKey) ?? plan.structures.get(toKey);
    if (!from || !to) {
      if (!from) reasons.push(`structure "${sp.fromLabel}" is not on the line "${lineKey}" and the row does not give its position`);
      if (!to) reasons.push(`structure "${sp.toLabel}" is not on the line "${lineKey}" and the row does not give its position`);
      return refuse();
    }
    const key = spanKeyOf(lineKey, sp.fromLabel, sp.toLabel);
    if (plan.spans.has(key)) {
      reasons.push(`the span ${sp.fromLabel} → ${sp.toLabel} already appears in row ${plan.spans.get(key)!.setByRow} of this file`);
      return refuse();
    }
    const givenSpan = Object.fromEntries(Object.entries(sp.given).filter(([, v]) => v !== undefined));
    const parsed = spanUpdateSchema.safeParse({ ...givenSpan, version: 1 });
    if (!parsed.success) {
      reasons.push(...issuesOf(parsed.error, 'span', name));
      return refuse();
    }
    const v = parsed.data;
    const existing = newLine ? null : (db.dbSpanByKey.get(key) ?? null);
    const existingHazards = existing ? (db.hazardsBySpan.get(existing.id) ?? []) : [];
    const fields: SpanFields = existing
      ? {
          conductorCodeWord: existing.conductorCodeWord,
          conductorSize: existing.conductorSize,
          conductorMaterial: existing.conductorMaterial,
          conductorDiameterMm: existing.conductorDiameterMm,
          conductorResistanceLowOhmPerM: existing.conductorResistanceLowOhmPerM,
          conductorTempLowC: existing.conductorTempLowC,
          conductorResistanceHighOhmPerM: existing.conductorResistanceHighOhmPerM,
          conductorTempHighC: existing.conductorTempHighC,
          phasePosition: existing.phasePosition,
          clearanceM: existing.clearanceM,
          lowestClearanceM: existing.lowestClearanceM,
          lowestClearanceAlongM: existing.lowestClearanceAlongM,
          terrain: existing.terrain,
          loadCurrentA: existing.loadCurrentA,
          surveyDate: existing.surveyDate,
        }
      : {
          conductorCodeWord: null,
          conductorSize: null,
          conductorMaterial: null,
          conductorDiameterMm: null,
          conductorResistanceLowOhmPerM: null,
          conductorTempLowC: null,
          conductorResistanceHighOhmPerM: null,
          conductorTempHighC: null,
          phasePosition: null,
          clearanceM: null,
          lowestClearanceM: null,
          lowestClearanceAlongM: null,
          terrain: null,
          loadCurrentA: null,
          surveyDate: null,
        };
    const next: SpanFields = { ...fields };
    if (v.conductor !== undefined) {
      if (v.conductor === null) Object.assign(next, Object.fromEntries(Object.keys(next).filter((k) => k.startsWith('conductor')).map((k) => [k, null])));
      else if (v.conductor.codeWord) {
        const c = db.catalogue.get(v.conductor.codeWord.toLowerCase());
        if (!c) {
          reasons.push(`${name('span', 'conductor.codeWord')}: "${v.conductor.codeWord}" is not in the conductor catalogue`);
          return refuse();
        }
        Object.assign(next, {
          conductorCodeWord: c.codeWord,
          conductorSize: `${c.size} ${c.stranding}`,
          conductorMaterial: c.material,
          conductorDiameterMm: c.diameterMm,
          conductorResistanceLowOhmPerM: c.resistanceAc25OhmPerM,
          conductorTempLowC: 25,
          conductorResistanceHighOhmPerM: c.resistanceAc75OhmPerM,
          conductorTempHighC: 75,
        });
      } else {
        Object.assign(next, {
          conductorCodeWord: null,
          conductorSize: v.conductor.size ?? null,
          conductorMaterial: v.conductor.material ?? null,
          conductorDiameterMm: v.conductor.diameterMm ?? null,
          conductorResistanceLowOhmPerM: v.conductor.resistanceLowOhmPerM ?? null,
          conductorTempLowC: v.conductor.tempLowC ?? null,
          conductorResistanceHighOhmPerM: v.conductor.resistanceHighOhmPerM ?? null,
          conductorTempHighC: v.conductor.tempHighC ?? null,
        });
      }
    }
    for (const k of ['phasePosition', 'clearanceM', 'lowestClearanceM', 'lowestClearanceAlongM', 'terrain', 'loadCurrentA', 'surveyDate'] as const) {
      if (v[k] !== undefined) (next as any)[k] = v[k];
    }
    if (next.clearanceM !== null && next.lowestClearanceM !== null && next.lowestClearanceM > next.clearanceM) {
      reasons.push(`${name('span', 'lowestClearanceM')}: the lowest clearance cannot be above the clearance at the perch point`);
      return refuse();
    }
    if (next.lowestClearanceAlongM !== null) {
      const lengthM = spanLengthM(from.fields, to.fields);
      if (next.lowestClearanceAlongM > lengthM + 0.5) {
        reasons.push(`${name('span', 'lowestClearanceAlongM')}: beyond the end of the span (${lengthM.toFixed(1)} m); give the distance from the from-structure`);
        return refuse();
      }
    }
    let hazards: HazardRecord[] = existingHazards.map((h) => ({ kindId: h.kindId, severity: h.severity, positionAlongM: h.positionAlongM, note: h.note }));
    if (v.hazards !== undefined) {
      const lengthM = spanLengthM(from.fields, to.fields);
      v.hazards.forEach((h, i) => {
        const kind = db.kinds.get(h.kindId);
        const wasThere = existingHazards.some((e) => e.kindId === h.kindId);
        if (!kind) reasons.push(`${name('span', `hazards.${i}.kindId`)}: "${h.kindId}" is not in the hazard catalogue`);
        else if (!kind.active && !wasThere) reasons.push(`${name('span', `hazards.${i}.kindId`)}: "${kind.label}" has been retired from the hazard catalogue`);
        if (h.positionAlongM != null && h.positionAlongM > lengthM + 0.5) reasons.push(`${name('span', `hazards.${i}.positionAlongM`)}: beyond the end of the span (${lengthM.toFixed(1)} m)`);
      });
      if (reasons.length) return refuse();
      hazards = v.hazards.map((h) => ({ kindId: h.kindId, severity: h.severity, positionAlongM: h.positionAlongM ?? null, note: h.note ?? '' }));
    }
    const hazardsChanged = !sameHazards(
      hazards,
      existingHazards.map((h) => ({ kindId: h.kindId, severity: h.severity, positionAlongM: h.positionAlongM, note: h.note })),
    );
    const changed = new Set(Object.keys(next).filter((k) => !eq((fields as any)[k], (next as any)[k])));
    if (existing && (changed.size || hazardsChanged) && (existing.status === 'submitted' || existing.status === 'suspended')) {
      reasons.push(
        existing.status === 'submitted'
          ? 'the span is awaiting review; the import cannot change it until a safety officer sends it back'
          : 'the span is suspended; a safety officer must reinstate it before it can be changed',
      );
      return refuse();
    }
    const action = !existing ? 'create' : changed.size || hazardsChanged ? 'update' : 'unchanged';
    if (existing && action === 'update') {
      const list = [...changed].map((k) => (k.startsWith('conductor') ? 'conductor' : k));
      if (hazardsChanged) list.push('hazards');
      changes.push(`span ${sp.fromLabel} → ${sp.toLabel}: ${[...new Set(list)].map((k) => name('span', k)).join(', ')}`);
    }
    records.push({ type: 'span', action, key: `${sp.fromLabel} → ${sp.toLabel}` });
    const planned: PlannedSpan = { key, lineKey, fromKey, toKey, existing, fields: next, hazards, existingHazards, hazardsChanged, changed, setByRow: raw.row };
    staged.push(() => plan.spans.set(key, planned));
  }

  for (const fn of staged) fn();
  for (const [k, s] of stagedStructures) plan.structures.set(k, s);
  const action: ImportRowReport['action'] = records.some((r) => r.action === 'create') ? 'create' : records.some((r) => r.action === 'update') ? 'update' : 'unchanged';
  return { report: { row: raw.row, action, subject: raw.subject, reasons: changes, records }, waiting: false };
}

/**
 * Applies a plan with no refused row, in the caller's transaction. Moving a structure re-measures every span
 * touching it (also spans not in the file); approved spans whose safety-relevant data changed go back to review.
 */
export async function applyPlan(em: EntityManager, user: User, plan: ImportPlan, opts: { inFileSpanIds?: ReadonlySet<string> } = {}): Promise<string[]> {
  const now = new Date();
  const lineByKey = new Map<string, Line>();
  const changedLineIds: string[] = [];
  // New records go in as bulk inserts (thousands of rows); edits of existing ones through the unit of work.
  const newLines: Line[] = [];
  const newStructures: Structure[] = [];
  const newSpans: Span[] = [];
  const newHazards: Hazard[] = [];
  const newAudits: Omit<AuditEntry, 'id'>[] = [];
  const push = <T>(list: T[], row: T): T => {
    list.push(row);
    return row;
  };
  for (const pl of plan.lines.values()) {
    if (pl.existing) {
      lineByKey.set(pl.key, pl.existing);
      if (!pl.changed.size) continue;
      changedLineIds.push(pl.existing.id);
      const before = lineSnapshot(pl.existing);
      Object.assign(pl.existing, pl.fields, { updatedAt: now });
      audit(em, { actorId: user.id, action: 'line.import-update', recordType: 'line', recordId: pl.existing.id, before, after: { ...lineSnapshot(pl.existing), version: pl.existing.version + 1 } });
    } else {
      const line = push(newLines, { id: newId(), name: pl.key, ...pl.fields, version: 1, createdAt: now, updatedAt: now } as Line);
      lineByKey.set(pl.key, line);
      push(newAudits, { at: now, actorId: user.id, action: 'line.import-create', recordType: 'line', recordId: line.id, before: null, after: lineSnapshot(line) });
    }
  }
  const structureByKey = new Map<string, Structure>();
  const moved = new Set<string>();
  for (const ps of plan.structures.values()) {
    if (ps.existing) {
      structureByKey.set(ps.key, ps.existing);
      if (!ps.changed.size) continue;
      const before = structureSnapshot(ps.existing);
      Object.assign(ps.existing, ps.fields, { updatedAt: now });
      moved.add(ps.existing.id);
      audit(em, { actorId: user.id, action: 'structure.import-update', recordType: 'structure', recordId: ps.existing.id, before, after: { ...structureSnapshot(ps.existing), version: ps.existing.version + 1 } });
    } else {
      const s = push(newStructures, { id: newId(), lineId: lineByKey.get(ps.lineKey)!.id, label: ps.label, ...ps.fields, version: 1, createdAt: now, updatedAt: now } as Structure);
      structureByKey.set(ps.key, s);
      push(newAudits, { at: now, actorId: user.id, action: 'structure.import-create', recordType: 'structure', recordId: s.id, before: null, after: structureSnapshot(s) });
    }
  }
  const touchedSpanIds = new Set<string>();
  // Spans of the file (all of it, when the plan is applied in parts): re-measured by their own row, not as "others".
  const inFile = new Set<string>(opts.inFileSpanIds ?? []);
  const createdSpans = new Map<PlannedSpan, Span>();
  for (const p of plan.spans.values()) {
    const from = structureByKey.get(p.fromKey)!;
    const to = structureByKey.get(p.toKey)!;
    if (p.existing) {
      inFile.add(p.existing.id);
      const span = p.existing;
      const lengthM = spanLengthM(from, to);
      const geometryChanged = !eq(span.lengthM, lengthM) || moved.has(span.fromStructureId) || moved.has(span.toStructureId);
      if (!p.changed.size && !p.hazardsChanged && !geometryChanged) continue;
      const before = spanSnapshot(span, p.existingHazards);
      Object.assign(span, p.fields);
      span.lengthM = lengthM;
      let hazards = p.existingHazards;
      if (p.hazardsChanged) {
        for (const h of p.existingHazards) em.remove(h);
        await unlinkPhotosFromHazards(em, p.existingHazards.map((h) => h.id));
        hazards = p.hazards.map((h) => em.create(Hazard, { id: newId(), spanId: span.id, ...h, createdAt: now }));
      }
      const safety = geometryChanged || p.hazardsChanged || [...p.changed].some((k) => k !== 'phasePosition' && k !== 'surveyDate');
      let action = 'span.import-update';
      if (span.status === 'approved' && safety) {
        span.status = 'submitted';
        span.submittedAt = now;
        span.approvedAt = null;
        span.approvedById = null;
        action = 'span.import-update.back-to-review';
      }
      span.updatedAt = now;
      touchedSpanIds.add(span.id);
      audit(em, { actorId: user.id, action, recordType: 'span', recordId: span.id, before, after: { ...spanSnapshot(span, hazards), version: span.version + 1 } });
    } else {
      const span = push(newSpans, {
        id: newId(),
        lineId: lineByKey.get(p.lineKey)!.id,
        fromStructureId: from.id,
        toStructureId: to.id,
        status: 'draft',
        version: 1,
        lengthM: spanLengthM(from, to),
        ...p.fields,
        surveyorId: user.id,
        returnReason: null,
        suspendReason: null,
        submittedAt: null,
        approvedAt: null,
        approvedById: null,
        createdAt: now,
        updatedAt: now,
      } as Span);
      createdSpans.set(p, span);
      const hazards = p.hazards.map((h) => push(newHazards, { id: newId(), spanId: span.id, ...h, createdAt: now } as Hazard));
      touchedSpanIds.add(span.id);
      push(newAudits, { at: now, actorId: user.id, action: 'span.import-create', recordType: 'span', recordId: span.id, before: null, after: spanSnapshot(span, hazards) });
    }
  }
  // Spans outside the file whose structures moved: re-measured, and back to review when approved.
  if (moved.size) {
    const others = await em.find(Span, { $or: [{ fromStructureId: { $in: [...moved] } }, { toStructureId: { $in: [...moved] } }] });
    for (const span of others) {
      if (inFile.has(span.id)) continue;
      const from = await em.findOne(Structure, { id: span.fromStructureId });
      const to = await em.findOne(Structure, { id: span.toStructureId });
      if (!from || !to) continue;
      const hazards = await em.find(Hazard, { spanId: span.id });
      const before = spanSnapshot(span, hazards);
      span.lengthM = spanLengthM(from, to);
      if (span.status === 'approved') {
        span.status = 'submitted';
        span.submittedAt = now;
        span.approvedAt = null;
        span.approvedById = null;
      }
      span.updatedAt = now;
      touchedSpanIds.add(span.id);
      audit(em, { actorId: user.id, action: 'span.structure-moved', recordType: 'span', recordId: span.id, before, after: { ...spanSnapshot(span, hazards), version: span.version + 1 } });
    }
  }
  await em.flush();
  for (const [entity, rows] of [
    [Line, newLines],
    [Structure, newStructures],
    [Span, newSpans],
    [Hazard, newHazards],
    [AuditEntry, newAudits],
  ] as const) {
    for (const part of chunks(rows as object[], 400)) await em.insertMany(entity as any, part as any[]);
  }
  // What is written now exists: applying the same plan again (its next part) writes nothing twice.
  for (const pl of plan.lines.values()) {
    pl.existing ??= lineByKey.get(pl.key) ?? null;
    pl.changed.clear();
  }
  for (const ps of plan.structures.values()) {
    ps.existing ??= structureByKey.get(ps.key) ?? null;
    ps.changed.clear();
  }
  for (const [p, span] of createdSpans) p.existing = span;
  for (const p of plan.spans.values()) {
    p.changed.clear();
    p.hazardsChanged = false;
  }
  // A changed load estimate changes the assessment of every span on the line.
  if (changedLineIds.length) for (const s of await em.find(Span, { lineId: { $in: changedLineIds } }, { fields: ['id'] })) touchedSpanIds.add(s.id);
  return [...touchedSpanIds];
}

export async function dryRun(em: EntityManager, format: ImportFormat, text: string): Promise<ImportReport> {
  return (await planImport(em, format, text)).report;
}

/** All or nothing: any refused row → 400 with the full report and nothing written. */
export async function commitImport(em: EntityManager, user: User, format: ImportFormat, text: string): Promise<ImportReport> {
  let report: ImportReport | null = null;
  let spanIds: string[] = [];
  await em.transactional(async (tem) => {
    const plan = await planImport(tem, format, text);
    report = plan.report;
    if (plan.report.summary.refuse > 0) {
      throw new ImportRefusedError(plan.report);
    }
    spanIds = await applyPlan(tem, user, plan);
  });
  await notifySpanChanged(em, { action: 'import', spanIds });
  return { ...report!, committed: true };
}

/** A commit with refused rows: 400, nothing written; the body carries the full row report in `error.report`. */
export class ImportRefusedError extends AppError {
  constructor(readonly report: ImportReport) {
    super(
      400,
      'bad_request',
      `Nothing was imported: ${report.summary.refuse} row(s) refused`,
      report.rows.filter((r) => r.action === 'refuse').flatMap((r) => r.reasons.map((reason) => ({ path: `row ${r.row}`, message: reason }))),
    );
  }
}
