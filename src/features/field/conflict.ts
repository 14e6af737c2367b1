// A stale save (409): the surveyor's values beside the saved record, field by field, and the merge they choose.
import type { HazardKind, Span, Structure, ConductorCatalogueEntry } from '#shared/schemas/inventory.ts';
import { TERRAIN_LABELS } from '#shared/schemas/inventory.ts';
import { unitLabel, type UnitSystem } from '#shared/units.ts';
import { spanToFormValues, type SpanFormValues } from './form-values.ts';

export type ConflictKey =
  | 'fromStructureId'
  | 'toStructureId'
  | 'conductor'
  | 'phasePosition'
  | 'clearance'
  | 'lowestClearance'
  | 'lowestClearanceAlong'
  | 'terrain'
  | 'loadCurrent'
  | 'surveyDate'
  | 'hazards';

/** Which form fields each compared item covers (the conductor and hazards move as a whole). */
const KEY_FIELDS: Record<ConflictKey, (keyof SpanFormValues)[]> = {
  fromStructureId: ['fromStructureId'],
  toStructureId: ['toStructureId'],
  conductor: ['conductorMode', 'conductorCodeWord', 'conductorSize', 'conductorMaterial', 'conductorDiameter'],
  phasePosition: ['phasePosition'],
  clearance: ['clearance'],
  lowestClearance: ['lowestClearance'],
  lowestClearanceAlong: ['lowestClearanceAlong'],
  terrain: ['terrain'],
  loadCurrent: ['loadCurrent'],
  surveyDate: ['surveyDate'],
  hazards: ['hazards'],
};

export interface ConflictLookups {
  structures: Pick<Structure, 'id' | 'label'>[];
  hazardKinds: Pick<HazardKind, 'id' | 'label'>[];
  conductors?: Pick<ConductorCatalogueEntry, 'codeWord'>[];
}

export interface ConflictRow {
  key: ConflictKey;
  label: string;
  mine: string;
  saved: string;
}

function describe(key: ConflictKey, v: SpanFormValues, system: UnitSystem, look: ConflictLookups): string {
  const len = unitLabel('length', system);
  const num = (s: string, unit: string) => (s.trim() === '' ? '—' : `${s} ${unit}`);
  switch (key) {
    case 'fromStructureId':
    case 'toStructureId':
      return look.structures.find((s) => s.id === v[key])?.label ?? (v[key] || '—');
    case 'conductor':
      if (v.conductorMode === 'catalogue') return v.conductorCodeWord || '—';
      return [v.conductorSize || 'custom', v.conductorMaterial, v.conductorDiameter ? `${v.conductorDiameter} ${unitLabel('diameter', system)}` : ''].filter(Boolean).join(', ');
    case 'phasePosition':
      return v.phasePosition || '—';
    case 'clearance':
    case 'lowestClearance':
      return num(v[key], len);
    case 'lowestClearanceAlong':
      return v.lowestClearanceAlong.trim() === '' ? '—' : `${v.lowestClearanceAlong} ${len} from the from-structure`;
    case 'terrain':
      return v.terrain ? TERRAIN_LABELS[v.terrain] : '—';
    case 'loadCurrent':
      return v.loadCurrent.trim() === '' ? 'from the line' : `${v.loadCurrent} A`;
    case 'surveyDate':
      return v.surveyDate || '—';
    case 'hazards':
      if (!v.hazards.length) return 'none';
      return v.hazards
        .map((h) => {
          const kind = look.hazardKinds.find((k) => k.id === h.kindId)?.label ?? (h.kindId || '?');
          const at = h.positionAlong.trim() ? ` at ${h.positionAlong} ${len}` : '';
          return `${kind} (${h.severity})${at}${h.note.trim() ? ` — ${h.note.trim()}` : ''}`;
        })
        .join('; ');
  }
}

const LABELS: Record<ConflictKey, string> = {
  fromStructureId: 'From structure',
  toStructureId: 'To structure',
  conductor: 'Conductor',
  phasePosition: 'Phase / position',
  clearance: 'Clearance at the perch point',
  lowestClearance: 'Lowest clearance',
  lowestClearanceAlong: 'Lowest clearance measured at',
  terrain: 'Terrain',
  loadCurrent: 'Load current',
  surveyDate: 'Survey date',
  hazards: 'Hazards',
};

/**
 * Every compared item, with the two readings; `differs` marks the ones the user must decide, and `changedByMe`
 * the ones the user edited since loading `base` (the others differ only because someone else changed them).
 */
export function compareWithSaved(
  mine: SpanFormValues,
  saved: Span,
  system: UnitSystem,
  look: ConflictLookups,
  base?: SpanFormValues,
): (ConflictRow & { differs: boolean; changedByMe: boolean })[] {
  const savedValues = spanToFormValues(saved, system);
  return (Object.keys(KEY_FIELDS) as ConflictKey[]).map((key) => {
    const a = describe(key, mine, system, look);
    const b = describe(key, savedValues, system, look);
    const changedByMe = base ? a !== describe(key, base, system, look) : true;
    return { key, label: LABELS[key], mine: a, saved: b, differs: a !== b, changedByMe };
  });
}

/** The form values to continue from: the saved record, with the user's value wherever they chose "mine". */
export function mergeChoices(mine: SpanFormValues, saved: Span, system: UnitSystem, takeMine: ReadonlySet<ConflictKey>): SpanFormValues {
  const merged: SpanFormValues = { ...spanToFormValues(saved, system) };
  for (const key of takeMine) for (const f of KEY_FIELDS[key]) (merged as unknown as Record<string, unknown>)[f] = structuredClone(mine[f]);
  return merged;
}

/** The saved record a 409 carries (`error.current`), if it is a span. */
export function savedFromConflict(body: unknown): Span | null {
  const current = (body as { error?: { current?: unknown } } | null)?.error?.current;
  return current && typeof current === 'object' && 'version' in current && 'id' in current ? (current as Span) : null;
}
