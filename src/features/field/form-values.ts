// The span form's values (numbers as typed, in the user's unit system) ⇄ the API payload (SI units).
// Kept pure so the conversion and the error mapping are tested without a browser.
import type { FieldValues, ResolverResult } from 'react-hook-form';
import type { z } from 'zod';
import type { UnitSystem } from '#shared/units.ts';
import {
  spanCreateSchema,
  spanUpdateSchema,
  SPAN_REQUIRED_FOR_SUBMIT,
  type ConductorMaterial,
  type HazardSeverityLevel,
  type Span,
  type SpanCreateInput,
  type SpanUpdateInput,
  type Terrain,
} from '#shared/schemas/inventory.ts';
import { inputToSi, siToInput } from './quantity.ts';

export interface HazardFormValues {
  /** Present for hazards already saved (keeps their photos). */
  id?: string;
  kindId: string;
  severity: HazardSeverityLevel;
  /** Position along the span from the from-structure, in the user's length unit. */
  positionAlong: string;
  note: string;
}

/** Form fields hold what the surveyor typed; the unit is the user's (m or ft, mm or in, A). */
export interface SpanFormValues {
  lineId: string;
  fromStructureId: string;
  toStructureId: string;
  /** 'catalogue' = a code word from GET /api/conductors; 'custom' = size, material and diameter by hand. */
  conductorMode: 'catalogue' | 'custom';
  conductorCodeWord: string;
  conductorSize: string;
  conductorMaterial: ConductorMaterial | '';
  conductorDiameter: string;
  phasePosition: string;
  clearance: string;
  lowestClearance: string;
  /** Where the lowest clearance was measured, from the from-structure, in the user's length unit. */
  lowestClearanceAlong: string;
  terrain: Terrain | '';
  /** Empty = inherit the line's load estimate. */
  loadCurrent: string;
  surveyDate: string;
  hazards: HazardFormValues[];
}

export type SpanFormField = keyof Omit<SpanFormValues, 'hazards'> | `hazards.${number}.${keyof HazardFormValues}` | 'hazards';

export function todayIso(now = new Date()): string {
  const y = now.getFullYear();
  const m = String(now.getMonth() + 1).padStart(2, '0');
  const d = String(now.getDate()).padStart(2, '0');
  return `${y}-${m}-${d}`;
}

export function emptySpanForm(now = new Date()): SpanFormValues {
  return {
    lineId: '',
    fromStructureId: '',
    toStructureId: '',
    conductorMode: 'catalogue',
    conductorCodeWord: '',
    conductorSize: '',
    conductorMaterial: '',
    conductorDiameter: '',
    phasePosition: '',
    clearance: '',
    lowestClearance: '',
    lowestClearanceAlong: '',
    terrain: '',
    loadCurrent: '',
    surveyDate: todayIso(now),
    hazards: [],
  };
}

/** A saved span → form values in the user's units. */
export function spanToFormValues(span: Span, system: UnitSystem): SpanFormValues {
  const c = span.conductor;
  const custom = !!c && !c.codeWord;
  return {
    lineId: span.lineId,
    fromStructureId: span.fromStructureId,
    toStructureId: span.toStructureId,
    conductorMode: custom ? 'custom' : 'catalogue',
    conductorCodeWord: c?.codeWord ?? '',
    conductorSize: custom ? (c?.size ?? '') : '',
    conductorMaterial: custom ? (c?.material ?? '') : '',
    conductorDiameter: custom ? siToInput(c?.diameterMm, 'diameter', system) : '',
    phasePosition: span.phasePosition ?? '',
    clearance: siToInput(span.clearanceM, 'length', system),
    lowestClearance: siToInput(span.lowestClearanceM, 'length', system),
    lowestClearanceAlong: siToInput(span.lowestClearanceAlongM, 'length', system),
    terrain: span.terrain ?? '',
    // The API reports the effective current; only the span's own estimate belongs in the form.
    loadCurrent: span.loadCurrentSource === 'span' ? siToInput(span.loadCurrentA, 'current', system) : '',
    surveyDate: span.surveyDate ?? '',
    hazards: span.hazards.map((h) => ({
      id: h.id,
      kindId: h.kindId,
      severity: h.severity,
      positionAlong: siToInput(h.positionAlongM, 'length', system),
      note: h.note ?? '',
    })),
  };
}

const blank = (s: string) => (s.trim() === '' ? null : s.trim());

/** The survey fields in SI, as both POST and PATCH take them. */
export function formValuesToSurvey(v: SpanFormValues, system: UnitSystem) {
  let conductor: NonNullable<SpanCreateInput['conductor']> | null = null;
  if (v.conductorMode === 'catalogue' && v.conductorCodeWord) conductor = { codeWord: v.conductorCodeWord };
  if (v.conductorMode === 'custom' && (blank(v.conductorSize) || v.conductorMaterial || blank(v.conductorDiameter)))
    conductor = {
      codeWord: null,
      size: blank(v.conductorSize),
      ...(v.conductorMaterial ? { material: v.conductorMaterial } : {}),
      diameterMm: inputToSi(v.conductorDiameter, 'diameter', system),
    };
  return {
    conductor,
    phasePosition: blank(v.phasePosition),
    clearanceM: inputToSi(v.clearance, 'length', system),
    lowestClearanceM: inputToSi(v.lowestClearance, 'length', system),
    lowestClearanceAlongM: inputToSi(v.lowestClearanceAlong, 'length', system),
    terrain: v.terrain || null,
    loadCurrentA: inputToSi(v.loadCurrent, 'current', system),
    surveyDate: blank(v.surveyDate),
    hazards: v.hazards.map((h) => ({
      ...(h.id ? { id: h.id } : {}),
      kindId: h.kindId,
      severity: h.severity,
      positionAlongM: inputToSi(h.positionAlong, 'length', system),
      note: h.note.trim(),
    })),
  };
}

export function formValuesToCreate(v: SpanFormValues, system: UnitSystem): SpanCreateInput {
  return { lineId: v.lineId, fromStructureId: v.fromStructureId, toStructureId: v.toStructureId, ...formValuesToSurvey(v, system) };
}

export function formValuesToUpdate(v: SpanFormValues, system: UnitSystem, version: number): SpanUpdateInput {
  return { version, fromStructureId: v.fromStructureId, toStructureId: v.toStructureId, ...formValuesToSurvey(v, system) };
}

const PATH_TO_FIELD: Record<string, SpanFormField> = {
  lineId: 'lineId',
  fromStructureId: 'fromStructureId',
  toStructureId: 'toStructureId',
  conductor: 'conductorCodeWord',
  'conductor.codeWord': 'conductorCodeWord',
  'conductor.size': 'conductorSize',
  'conductor.material': 'conductorMaterial',
  'conductor.diameterMm': 'conductorDiameter',
  phasePosition: 'phasePosition',
  clearanceM: 'clearance',
  lowestClearanceM: 'lowestClearance',
  lowestClearanceAlongM: 'lowestClearanceAlong',
  terrain: 'terrain',
  loadCurrentA: 'loadCurrent',
  surveyDate: 'surveyDate',
  hazards: 'hazards',
};
const HAZARD_FIELD: Record<string, keyof HazardFormValues> = { kindId: 'kindId', severity: 'severity', positionAlongM: 'positionAlong', note: 'note' };

/** An API issue path ("clearanceM", "conductor.diameterMm", "hazards.2.positionAlongM") → the form field showing it; null = form-level. */
export function issuePathToField(path: string): SpanFormField | null {
  if (PATH_TO_FIELD[path]) return PATH_TO_FIELD[path];
  const m = /^hazards\.(\d+)\.(\w+)$/.exec(path);
  if (m && HAZARD_FIELD[m[2]]) return `hazards.${Number(m[1])}.${HAZARD_FIELD[m[2]]}`;
  if (path.startsWith('conductor.')) return 'conductorCodeWord';
  return null;
}

export interface FieldIssue {
  field: SpanFormField | null;
  message: string;
}

export function mapIssues(issues: readonly { path: string; message: string }[]): FieldIssue[] {
  return issues.map((i) => ({ field: issuePathToField(i.path), message: i.message }));
}

function zodIssues(error: z.ZodError) {
  return error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }));
}

/** Checks the values the way the server will: convert to SI, then the shared schema. */
export function validateSpanForm(v: SpanFormValues, system: UnitSystem, mode: { version?: number }): FieldIssue[] {
  const result =
    mode.version === undefined ? spanCreateSchema.safeParse(formValuesToCreate(v, system)) : spanUpdateSchema.safeParse(formValuesToUpdate(v, system, mode.version));
  const issues = result.success ? [] : mapIssues(zodIssues(result.error));
  // The line is fixed once the span exists, but the form still needs one to pick structures.
  if (!v.lineId) issues.push({ field: 'lineId', message: 'Choose a line' });
  return dedupe(issues);
}

const REQUIRED_MESSAGES: Record<(typeof SPAN_REQUIRED_FOR_SUBMIT)[number], FieldIssue> = {
  conductor: { field: 'conductorCodeWord', message: 'Pick the conductor before submitting' },
  clearanceM: { field: 'clearance', message: 'Measure the clearance at the perch point before submitting' },
  terrain: { field: 'terrain', message: 'Choose the terrain before submitting' },
  surveyDate: { field: 'surveyDate', message: 'Enter the survey date before submitting' },
};

/** What review needs on top of a valid draft (the server checks the same on submit). */
export function missingForSubmit(v: SpanFormValues, system: UnitSystem): FieldIssue[] {
  const s = formValuesToSurvey(v, system);
  return SPAN_REQUIRED_FOR_SUBMIT.filter((k) => s[k] === null || s[k] === undefined).map((k) => REQUIRED_MESSAGES[k]);
}

function dedupe(issues: FieldIssue[]) {
  const seen = new Set<string>();
  return issues.filter((i) => {
    const key = `${i.field}|${i.message}`;
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}

/** A react-hook-form resolver over the shared zod schema, via the SI conversion (so the rules are the server's). */
export function spanFormResolver(system: UnitSystem, getVersion: () => number | undefined) {
  return async (values: SpanFormValues): Promise<ResolverResult<SpanFormValues>> => {
    const issues = validateSpanForm(values, system, { version: getVersion() });
    if (!issues.length) return { values, errors: {} };
    return { values: {}, errors: issuesToErrors(issues) as ResolverResult<SpanFormValues>['errors'] };
  };
}

/** Nested FieldErrors object from flat issues (first message per field wins). */
export function issuesToErrors(issues: FieldIssue[]): FieldValues {
  const errors: FieldValues = {};
  for (const i of issues) {
    const parts = (i.field ?? 'root').split('.');
    let node = errors;
    for (let k = 0; k < parts.length - 1; k++) {
      const key = parts[k];
      node[key] ??= /^\d+$/.test(parts[k + 1]) ? [] : {};
      node = node[key];
    }
    const last = parts[parts.length - 1];
    if (!node[last]) node[last] = { type: 'validate', message: i.message };
  }
  return errors;
}
