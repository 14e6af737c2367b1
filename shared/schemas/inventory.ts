// Line inventory: the shared zod schemas (server validation and the client forms) and the API response types.
// SI units throughout: m, mm, A, kV, Hz, Ω/m, °C.
import { z } from 'zod';
import type { DetailPart } from '../engineering/assessment.ts';

export const SPAN_STATUSES = ['draft', 'submitted', 'approved', 'returned', 'suspended'] as const;
export type SpanStatus = (typeof SPAN_STATUSES)[number];
export const SPAN_STATUS_LABELS: Record<SpanStatus, string> = {
  draft: 'Draft',
  submitted: 'Awaiting review',
  approved: 'Approved',
  returned: 'Sent back',
  suspended: 'Suspended',
};

export const STRUCTURE_KINDS = ['pole', 'tower', 'h-frame', 'other'] as const;
export type StructureKind = (typeof STRUCTURE_KINDS)[number];

export const CONDUCTOR_MATERIALS = ['ACSR', 'AAC', 'AAAC', 'ACSS', 'copper', 'other'] as const;
export type ConductorMaterial = (typeof CONDUCTOR_MATERIALS)[number];

export const TERRAINS = ['open-field', 'road', 'rail', 'water', 'forest', 'urban', 'other'] as const;
export type Terrain = (typeof TERRAINS)[number];
export const TERRAIN_LABELS: Record<Terrain, string> = {
  'open-field': 'Open field',
  road: 'Road',
  rail: 'Railway',
  water: 'Water',
  forest: 'Forest',
  urban: 'Built-up area',
  other: 'Other',
};

export const HAZARD_SEVERITIES = ['low', 'medium', 'high'] as const;
export type HazardSeverityLevel = (typeof HAZARD_SEVERITIES)[number];

/** Page sizes of list endpoints are capped here. */
export const MAX_PAGE_SIZE = 200;

// ---------- building blocks ----------

const id = (what: string) => z.string({ error: `Choose a ${what}` }).trim().min(1, `Choose a ${what}`).max(64);
const finite = (what: string) => z.number({ error: `Enter ${what} as a number` }).refine(Number.isFinite, `Enter ${what} as a number`);
const nonNegative = (what: string, max: number, unit: string) =>
  finite(what).min(0, `${cap(what)} cannot be negative`).max(max, `${cap(what)} must be at most ${max} ${unit}`);
function cap(s: string) {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
const isoDate = z
  .string({ error: 'Enter the date as YYYY-MM-DD' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Enter the date as YYYY-MM-DD')
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), 'This is not a calendar date');

export const latSchema = finite('the latitude').min(-90, 'Latitude must be between −90° and 90°').max(90, 'Latitude must be between −90° and 90°');
export const lonSchema = finite('the longitude').min(-180, 'Longitude must be between −180° and 180°').max(180, 'Longitude must be between −180° and 180°');
const versionSchema = z
  .number({ error: 'The record version is missing; reload the record and try again' })
  .int('The record version must be a whole number')
  .min(1, 'The record version must be 1 or more');

// ---------- lines ----------

export const loadProfileSchema = z
  .array(nonNegative('hourly load', 10_000, 'A'), { error: 'Give the hourly profile as a list of 24 currents' })
  .length(24, 'Give exactly 24 hourly values (00:00 to 23:00)');

const lineFields = {
  name: z.string({ error: 'Enter the line name' }).trim().min(1, 'Enter the line name').max(120, 'Use at most 120 characters'),
  owner: z.string({ error: 'Enter the owner utility' }).trim().min(1, 'Enter the owner utility').max(160, 'Use at most 160 characters'),
  voltageKv: finite('the voltage').gt(0, 'The voltage must be above 0 kV').max(1200, 'The voltage must be at most 1200 kV'),
  frequencyHz: z.union([z.literal(50), z.literal(60)], { error: 'The frequency must be 50 or 60 Hz' }),
  phases: z.number({ error: 'Enter the phase count' }).int('The phase count must be a whole number').min(1, 'At least 1 phase').max(6, 'At most 6 phases'),
  loadTypicalA: nonNegative('the typical load', 10_000, 'A'),
  loadMinA: nonNegative('the minimum load', 10_000, 'A'),
  loadPeakA: nonNegative('the peak load', 10_000, 'A'),
  loadProfileA: loadProfileSchema.nullable(),
};

function checkLoadOrder(v: { loadMinA?: number; loadTypicalA?: number; loadPeakA?: number }, ctx: z.RefinementCtx) {
  if (v.loadMinA !== undefined && v.loadTypicalA !== undefined && v.loadMinA > v.loadTypicalA)
    ctx.addIssue({ code: 'custom', path: ['loadMinA'], message: 'The minimum load cannot be above the typical load' });
  if (v.loadTypicalA !== undefined && v.loadPeakA !== undefined && v.loadTypicalA > v.loadPeakA)
    ctx.addIssue({ code: 'custom', path: ['loadPeakA'], message: 'The peak load cannot be below the typical load' });
}

export const lineCreateSchema = z
  .object({ ...lineFields, phases: lineFields.phases.default(3), loadProfileA: lineFields.loadProfileA.optional().default(null) })
  .superRefine(checkLoadOrder);
export type LineCreateInput = z.input<typeof lineCreateSchema>;

/** Partial update; the server re-checks min ≤ typical ≤ peak against the saved values. */
export const lineUpdateSchema = z.object(lineFields).partial().extend({ version: versionSchema }).superRefine(checkLoadOrder);
export type LineUpdateInput = z.input<typeof lineUpdateSchema>;

// ---------- structures ----------

export const structureCreateSchema = z.object({
  lineId: id('line'),
  lat: latSchema,
  lon: lonSchema,
  kind: z.enum(STRUCTURE_KINDS, { error: 'Choose pole, tower, H-frame or other' }),
  attachmentHeightM: finite('the attachment height').gt(0, 'The attachment height must be above 0 m').max(200, 'The attachment height must be at most 200 m'),
  /** Optional; the server numbers structures per line when absent (e.g. "HV69-N-014"). */
  label: z.string().trim().min(1, 'Enter a label or leave it out').max(60, 'Use at most 60 characters').optional(),
});
export type StructureCreateInput = z.input<typeof structureCreateSchema>;

export const structureUpdateSchema = structureCreateSchema.omit({ lineId: true }).partial().extend({ version: versionSchema });
export type StructureUpdateInput = z.input<typeof structureUpdateSchema>;

export const structureListQuerySchema = z.object({ lineId: z.string().trim().min(1).max(64).optional() });

// ---------- spans ----------

export const hazardInputSchema = z.object({
  /** An existing hazard's id keeps it (and its photos); new hazards leave it out. */
  id: z.string().max(64).optional(),
  kindId: id('hazard kind'),
  severity: z.enum(HAZARD_SEVERITIES, { error: 'Choose low, medium or high' }),
  positionAlongM: nonNegative('the position along the span', 5000, 'm').nullable().optional(),
  note: z.string().trim().max(1000, 'Use at most 1000 characters').optional(),
});
export type HazardInput = z.input<typeof hazardInputSchema>;

/**
 * The conductor as surveyed. Pick a catalogue code word (the server fills size, diameter and resistances),
 * or describe a custom conductor: then `diameterMm` is required.
 */
export const conductorInputSchema = z
  .object({
    codeWord: z.string().trim().min(1).max(40).nullable().optional(),
    size: z.string().trim().max(60, 'Use at most 60 characters').nullable().optional(),
    material: z.enum(CONDUCTOR_MATERIALS, { error: 'Choose the conductor material' }).optional(),
    diameterMm: finite('the diameter').gt(0, 'The diameter must be above 0 mm').max(200, 'The diameter must be at most 200 mm').nullable().optional(),
    resistanceLowOhmPerM: finite('the resistance').gt(0, 'The resistance must be above 0').max(1, 'The resistance must be at most 1 Ω/m').nullable().optional(),
    tempLowC: finite('the temperature').min(-40).max(250).nullable().optional(),
    resistanceHighOhmPerM: finite('the resistance').gt(0, 'The resistance must be above 0').max(1, 'The resistance must be at most 1 Ω/m').nullable().optional(),
    tempHighC: finite('the temperature').min(-40).max(250).nullable().optional(),
  })
  .superRefine((c, ctx) => {
    if (!c.codeWord && (c.diameterMm === undefined || c.diameterMm === null))
      ctx.addIssue({ code: 'custom', path: ['diameterMm'], message: 'Pick a code word from the catalogue, or enter the outside diameter of the custom conductor' });
    const lowGiven = c.resistanceLowOhmPerM != null || c.tempLowC != null;
    const highGiven = c.resistanceHighOhmPerM != null || c.tempHighC != null;
    if ((lowGiven || highGiven) && c.tempLowC != null && c.tempHighC != null && c.tempHighC <= c.tempLowC)
      ctx.addIssue({ code: 'custom', path: ['tempHighC'], message: 'The high temperature must be above the low one' });
  });
export type ConductorInput = z.input<typeof conductorInputSchema>;

const clearance = (what: string) => finite(what).min(0, `${cap(what)} cannot be negative`).max(150, `${cap(what)} must be at most 150 m`);

/** Survey fields: every one may stay empty in a draft; submitting checks completeness. */
const spanSurveyFields = {
  conductor: conductorInputSchema.nullable(),
  phasePosition: z.string().trim().max(40, 'Use at most 40 characters').nullable(),
  clearanceM: clearance('the clearance at the perch point').nullable(),
  lowestClearanceM: clearance('the lowest clearance').nullable(),
  /** Where the lowest clearance was measured, m from the from-structure (the server checks it lies within the span). */
  lowestClearanceAlongM: nonNegative('the lowest-clearance location', 5000, 'm').nullable(),
  terrain: z.enum(TERRAINS, { error: 'Choose the terrain under the span' }).nullable(),
  /** null: inherit the line's load estimate. */
  loadCurrentA: nonNegative('the load current', 10_000, 'A').nullable(),
  surveyDate: isoDate.nullable(),
  hazards: z.array(hazardInputSchema).max(50, 'At most 50 hazards per span'),
};

function checkClearances(v: { clearanceM?: number | null; lowestClearanceM?: number | null }, ctx: z.RefinementCtx) {
  if (v.clearanceM != null && v.lowestClearanceM != null && v.lowestClearanceM > v.clearanceM)
    ctx.addIssue({ code: 'custom', path: ['lowestClearanceM'], message: 'The lowest clearance cannot be above the clearance at the perch point' });
}

const spanSurveyShape = z.object(spanSurveyFields).partial();

export const spanCreateSchema = spanSurveyShape
  .extend({ lineId: id('line'), fromStructureId: id('from-structure'), toStructureId: id('to-structure') })
  .superRefine((v, ctx) => {
    if (v.fromStructureId === v.toStructureId) ctx.addIssue({ code: 'custom', path: ['toStructureId'], message: 'A span needs two different structures' });
    checkClearances(v, ctx);
  });
export type SpanCreateInput = z.input<typeof spanCreateSchema>;

/** Partial update: only the fields sent change; `version` is required (stale → 409). */
export const spanUpdateSchema = spanSurveyShape
  .extend({ version: versionSchema, fromStructureId: id('from-structure').optional(), toStructureId: id('to-structure').optional() })
  .superRefine((v, ctx) => {
    if (v.fromStructureId && v.fromStructureId === v.toStructureId) ctx.addIssue({ code: 'custom', path: ['toStructureId'], message: 'A span needs two different structures' });
    checkClearances(v, ctx);
  });
export type SpanUpdateInput = z.input<typeof spanUpdateSchema>;

/** Fields whose change on an approved span sends it back to review (status submitted). */
export const SAFETY_RELEVANT_SPAN_FIELDS = ['fromStructureId', 'toStructureId', 'conductor', 'clearanceM', 'lowestClearanceM', 'lowestClearanceAlongM', 'loadCurrentA', 'hazards', 'terrain'] as const;

/** Fields a span needs before it can be submitted for review. */
export const SPAN_REQUIRED_FOR_SUBMIT = ['conductor', 'clearanceM', 'terrain', 'surveyDate'] as const;

/** submit / approve / reinstate: an optional version guards against acting on a stale view. */
export const spanTransitionSchema = z.object({ version: versionSchema.optional() });
/** return / suspend: the reason is required. */
export const spanReasonTransitionSchema = z.object({
  reason: z.string({ error: 'Give a reason' }).trim().min(1, 'Give a reason').max(2000, 'Use at most 2000 characters'),
  version: versionSchema.optional(),
});
export type SpanReasonTransitionInput = z.input<typeof spanReasonTransitionSchema>;

export const SPAN_SORT_KEYS = ['lengthM', 'updatedAt', 'createdAt', 'status', 'clearanceM', 'loadCurrentA', 'surveyDate', 'harvestW', 'score', 'line'] as const;
export type SpanSortKey = (typeof SPAN_SORT_KEYS)[number];
const sortValues = SPAN_SORT_KEYS.flatMap((k) => [k, `-${k}`]) as [string, ...string[]];

const optionalNumber = (what: string) =>
  z.preprocess((v) => (v === '' || v === undefined ? undefined : typeof v === 'string' ? Number(v) : v), finite(what).optional());

/** GET /api/spans query (strings from the URL; numbers coerced). `status` takes one status or a comma-separated list. */
export const spanListQuerySchema = z.object({
  status: z
    .preprocess(
      (v) => (typeof v === 'string' ? (v === '' ? undefined : v.split(',').map((s) => s.trim())) : v),
      z.array(z.enum(SPAN_STATUSES, { error: `Status must be one of ${SPAN_STATUSES.join(', ')}` })).optional(),
    )
    .optional(),
  lineId: z.string().trim().max(64).optional(),
  /** Only spans surveyed by this user; `mine=true` means the signed-in user. */
  surveyorId: z.string().trim().max(64).optional(),
  mine: z.preprocess((v) => v === 'true' || v === '1' || v === true, z.boolean()).optional(),
  /** true: only spans that pass every blocking gate for at least one active harvester × drone pair; false: only the others. */
  perchable: z
    .preprocess((v) => (v === '' || v === undefined ? undefined : v === 'true' || v === '1' || v === true ? true : v === 'false' || v === '0' || v === false ? false : v), z.boolean({ error: 'perchable is true or false' }))
    .optional(),
  // eslint-disable-next-line no-control-regex
  q: z.string().trim().max(200, 'Use at most 200 characters').regex(/^[^\u0000-\u001f\u007f]*$/, 'Search text cannot contain control characters').optional(),
  minHarvestW: optionalNumber('the minimum harvest power'),
  minScore: optionalNumber('the minimum score'),
  sort: z.enum(sortValues, { error: `Sort by one of ${SPAN_SORT_KEYS.join(', ')} (prefix - for descending)` }).optional(),
  page: z.preprocess((v) => (v === '' || v === undefined ? undefined : Number(v)), z.number().int('Page must be a whole number').min(1, 'Page starts at 1').default(1)),
  pageSize: z.preprocess(
    (v) => (v === '' || v === undefined ? undefined : Number(v)),
    z.number().int('Page size must be a whole number').min(1, 'Page size must be at least 1').max(MAX_PAGE_SIZE, `Page size must be at most ${MAX_PAGE_SIZE}`).default(50),
  ),
});
export type SpanListQuery = z.input<typeof spanListQuerySchema>;

// ---------- hazard kinds ----------

export const hazardKindCreateSchema = z.object({
  id: z
    .string({ error: 'Enter a short id' })
    .trim()
    .regex(/^[a-z0-9]+(-[a-z0-9]+)*$/, 'Use lower-case letters, digits and hyphens, e.g. "guy-wire"')
    .max(60),
  label: z.string({ error: 'Enter a label' }).trim().min(1, 'Enter a label').max(120, 'Use at most 120 characters'),
  defaultSeverity: z.enum(HAZARD_SEVERITIES, { error: 'Choose low, medium or high' }),
  active: z.boolean().default(true),
});
export const hazardKindUpdateSchema = hazardKindCreateSchema.omit({ id: true }).partial();

// ---------- response types ----------

export interface Line {
  id: string;
  name: string;
  owner: string;
  voltageKv: number;
  frequencyHz: 50 | 60;
  phases: number;
  loadTypicalA: number;
  loadMinA: number;
  loadPeakA: number;
  loadProfileA: number[] | null;
  version: number;
  structureCount?: number;
  spanCount?: number;
  createdAt: string;
  updatedAt: string;
}

export interface Structure {
  id: string;
  lineId: string;
  lat: number;
  lon: number;
  kind: StructureKind;
  label: string;
  attachmentHeightM: number;
  version: number;
  createdAt: string;
  updatedAt: string;
}

export interface Hazard {
  id: string;
  kindId: string;
  severity: HazardSeverityLevel;
  positionAlongM: number | null;
  note: string;
}

export interface HazardKind {
  id: string;
  label: string;
  defaultSeverity: HazardSeverityLevel;
  active: boolean;
}

export interface SpanConductor {
  codeWord: string | null;
  size: string | null;
  material: ConductorMaterial | null;
  diameterMm: number | null;
  resistanceLowOhmPerM: number | null;
  tempLowC: number | null;
  resistanceHighOhmPerM: number | null;
  tempHighC: number | null;
  /** 'catalogue' when filled from the code word, 'custom' when entered by hand. */
  source: 'catalogue' | 'custom';
}

/** The assessment for the default harvester × drone pair, as the assessment module reports it. */
export interface SpanAssessmentSummary {
  perchable: boolean;
  score: number;
  harvestW: number;
  chargeTimeMin?: number | null;
  conductorTempC?: number | null;
  ampacityA?: number | null;
  gates?: { id: string; passed: boolean; detail: string }[];
  factors?: { id: string; value: number; weight: number; contribution: number }[];
  methodVersion?: string;
  [extra: string]: unknown;
}

export interface Span {
  id: string;
  lineId: string;
  lineName: string;
  fromStructureId: string;
  toStructureId: string;
  fromStructureLabel: string;
  toStructureLabel: string;
  status: SpanStatus;
  version: number;
  lengthM: number;
  conductor: SpanConductor | null;
  phasePosition: string | null;
  clearanceM: number | null;
  lowestClearanceM: number | null;
  /** Where the lowest clearance was measured, m along the span from the from-structure. */
  lowestClearanceAlongM: number | null;
  terrain: Terrain | null;
  /** Effective load current: the span's own estimate, else the line's typical load. */
  loadCurrentA: number;
  loadCurrentSource: 'span' | 'line';
  hazards: Hazard[];
  photoIds: string[];
  surveyDate: string | null;
  surveyorId: string | null;
  returnReason: string | null;
  suspendReason: string | null;
  submittedAt: string | null;
  approvedAt: string | null;
  approvedById: string | null;
  assessment: SpanAssessmentSummary | null;
  /** Passes every blocking gate for at least one active harvester × drone pair; null when not assessed yet. */
  perchable?: boolean | null;
  /** Approved but no longer perchable: flagged on the review desk until a safety officer decides. */
  needsDecision?: boolean;
  /** The blocking gates that fail (in words) when the span is not perchable. */
  failingGates?: { id: string; label: string; detail: string; parts?: DetailPart[]; pairs: string[] }[];
  createdAt: string;
  updatedAt: string;
}

export interface ConductorCatalogueEntry {
  codeWord: string;
  size: string;
  stranding: string;
  material: ConductorMaterial;
  diameterMm: number;
  resistanceDc20OhmPerM: number;
  resistanceAc25OhmPerM: number;
  resistanceAc75OhmPerM: number;
  weightKgPerM: number | null;
}

export interface Page<T> {
  items: T[];
  total: number;
  page: number;
  pageSize: number;
}

/** 409 on a stale version: the saved record rides along so the client can show both. */
export interface StaleVersionErrorBody {
  error: { code: 'conflict'; message: string; current: unknown };
}

// ---------- import ----------

export const IMPORT_FORMATS = ['csv', 'geojson'] as const;
export type ImportFormat = (typeof IMPORT_FORMATS)[number];

/** JSON body of POST /api/import/dry-run and /commit (multipart with a `file` field also works). */
export const importRequestSchema = z.object({
  format: z.enum(IMPORT_FORMATS, { error: 'The format must be csv or geojson' }).optional(),
  text: z.string({ error: 'Give the file content as text' }).min(1, 'The file is empty'),
});

export type ImportAction = 'create' | 'update' | 'unchanged' | 'refuse';
export interface ImportRowReport {
  /** 1-based data row (CSV: the header is row 0; GeoJSON: the feature index + 1). */
  row: number;
  action: ImportAction;
  /** What the row is about, e.g. "span HV69-N-003 → HV69-N-004". */
  subject: string;
  reasons: string[];
  /** The records the row creates or updates. */
  records?: { type: 'line' | 'structure' | 'span'; action: 'create' | 'update' | 'unchanged'; key: string }[];
}
export interface ImportReport {
  format: ImportFormat;
  committed: boolean;
  rows: ImportRowReport[];
  summary: { create: number; update: number; unchanged: number; refuse: number };
}

/**
 * The CSV columns of import and export, one span a row (SI units). Keys: a line by `line_name`, a structure by
 * `line_name` + its label, a span by its line and its two structure labels (either direction), so a re-import updates.
 * An empty cell clears the field; a missing column leaves it as saved. `load_profile_a`: 24 numbers separated by `;`.
 * `hazards`: a JSON list of {kindId, severity, positionAlongM?, note?}. With `conductor_code_word` the catalogue fills
 * the conductor; otherwise the conductor_* columns describe a custom one (diameter required).
 */
export const INVENTORY_CSV_COLUMNS = [
  'line_name',
  'line_owner',
  'voltage_kv',
  'frequency_hz',
  'phases',
  'load_typical_a',
  'load_min_a',
  'load_peak_a',
  'load_profile_a',
  'from_label',
  'from_lat',
  'from_lon',
  'from_kind',
  'from_attachment_height_m',
  'to_label',
  'to_lat',
  'to_lon',
  'to_kind',
  'to_attachment_height_m',
  'conductor_code_word',
  'conductor_size',
  'conductor_material',
  'conductor_diameter_mm',
  'conductor_resistance_low_ohm_per_m',
  'conductor_temp_low_c',
  'conductor_resistance_high_ohm_per_m',
  'conductor_temp_high_c',
  'phase_position',
  'clearance_m',
  'lowest_clearance_m',
  'lowest_clearance_along_m',
  'terrain',
  'load_current_a',
  'survey_date',
  'hazards',
] as const;

/** Columns the CSV export adds after the importable ones; import ignores them (they are computed or set by review). */
export const INVENTORY_CSV_EXPORT_ONLY_COLUMNS = ['span_id', 'status', 'length_m', 'harvest_w', 'score', 'perchable'] as const;
