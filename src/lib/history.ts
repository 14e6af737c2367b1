// Audit entries in words: "Clearance at the perch point 9.40 m → 9.60 m", "Status Submitted → Approved".
// Field names are labelled, quantities formatted in the user's units, codes written out; ids, JSON and
// bookkeeping (version, timestamps) never reach the screen.
import { ROLE_LABELS } from '#shared/roles.ts';
import { SPAN_STATUS_LABELS, TERRAIN_LABELS } from '#shared/schemas/inventory.ts';
import { formatQuantity, type QuantityKind, type UnitSystem } from '#shared/units.ts';
import { codeWords, date, dateTime, number, percent } from './format.ts';

export interface FieldChange {
  field: string;
  before: string;
  after: string;
}

/** Names the screen knows for ids it may meet (hazard kinds, lines, structures, crews…); unknown ids read as "another …". */
export type NameOf = (field: string, id: string) => string | undefined;

export interface DescribeOptions {
  system: UnitSystem;
  nameOf?: NameOf;
}

type Kind =
  | { quantity: QuantityKind; digits?: number }
  | { as: 'text' | 'date' | 'datetime' | 'code' | 'id' | 'bool' | 'share' | 'percent' | 'degrees' | 'count' | 'bytes' | 'coordinate' | 'status' | 'terrain' | 'roles' | 'geometry' | 'mime' | 'hazards'; unit?: string };

interface FieldSpec {
  label: string;
  kind: Kind;
}

const q = (quantity: QuantityKind, digits?: number): Kind => ({ quantity, digits });
const as = (a: Extract<Kind, { as: string }>['as'], unit?: string): Kind => ({ as: a, unit });

/** Fields whose label or kind cannot be read off the name. */
const FIELDS: Record<string, FieldSpec> = {
  status: { label: 'Status', kind: as('status') },
  lineId: { label: 'Line', kind: as('id') },
  fromStructureId: { label: 'From structure', kind: as('id') },
  toStructureId: { label: 'To structure', kind: as('id') },
  surveyorId: { label: 'Surveyor', kind: as('id') },
  spanId: { label: 'Span', kind: as('id') },
  hazardId: { label: 'Hazard', kind: as('id') },
  kindId: { label: 'Hazard kind', kind: as('id') },
  crewId: { label: 'Crew', kind: as('id') },
  harvesterProfileId: { label: 'Harvester profile', kind: as('id') },
  lengthM: { label: 'Length', kind: q('length') },
  clearanceM: { label: 'Clearance at the perch point', kind: q('length') },
  lowestClearanceM: { label: 'Lowest clearance', kind: q('length') },
  lowestClearanceAlongM: { label: 'Lowest clearance measured at', kind: q('length') },
  positionAlongM: { label: 'Position along the span', kind: q('length') },
  attachmentHeightM: { label: 'Attachment height', kind: q('length') },
  approachClearanceM: { label: 'Approach clearance', kind: q('length') },
  diameterMm: { label: 'Outside diameter', kind: q('diameter') },
  loadCurrentA: { label: 'Load current', kind: q('current') },
  terrain: { label: 'Terrain', kind: as('terrain') },
  phasePosition: { label: 'Phase / position', kind: as('text') },
  surveyDate: { label: 'Survey date', kind: as('date') },
  returnReason: { label: 'Reason for return', kind: as('text') },
  suspendReason: { label: 'Reason for suspension', kind: as('text') },
  hazards: { label: 'Hazards', kind: as('hazards') },
  codeWord: { label: 'Code word', kind: as('text') },
  size: { label: 'Size', kind: as('text') },
  material: { label: 'Material', kind: as('text') },
  source: { label: 'Source', kind: as('code') },
  label: { label: 'Label', kind: as('text') },
  name: { label: 'Name', kind: as('text') },
  owner: { label: 'Owner', kind: as('text') },
  email: { label: 'E-mail', kind: as('text') },
  note: { label: 'Note', kind: as('text') },
  notes: { label: 'Notes', kind: as('text') },
  reason: { label: 'Reason', kind: as('text') },
  fileName: { label: 'File', kind: as('text') },
  timeZone: { label: 'Time zone', kind: as('text') },
  lat: { label: 'Latitude', kind: as('coordinate') },
  lon: { label: 'Longitude', kind: as('coordinate') },
  kind: { label: 'Kind', kind: as('code') },
  severity: { label: 'Severity', kind: as('code') },
  positionSource: { label: 'Position from', kind: as('code') },
  contentType: { label: 'File type', kind: as('mime') },
  bytes: { label: 'File size', kind: as('bytes') },
  geometry: { label: 'Shape', kind: as('geometry') },
  validFrom: { label: 'Valid from', kind: as('datetime') },
  validTo: { label: 'Valid to', kind: as('datetime') },
  expiresAt: { label: 'Expires', kind: as('datetime') },
  roles: { label: 'Roles', kind: as('roles') },
  active: { label: 'Active', kind: as('bool') },
  unitSystem: { label: 'Units', kind: as('code') },
  voltageKv: { label: 'Voltage', kind: q('voltage') },
  frequencyHz: { label: 'Frequency', kind: as('count', 'Hz') },
  phases: { label: 'Phases', kind: as('count') },
  loadTypicalA: { label: 'Typical load', kind: q('current') },
  loadMinA: { label: 'Minimum load', kind: q('current') },
  loadPeakA: { label: 'Peak load', kind: q('current') },
  loadProfileA: { label: 'Daily load profile', kind: as('count') },
  turns: { label: 'Turns', kind: as('count') },
  fixtureTurns: { label: 'Fixture turns', kind: as('count') },
  coreAreaMm2: { label: 'Core cross-section', kind: as('count', 'mm²') },
  relativePermeability: { label: 'Relative permeability', kind: as('count') },
  saturationT: { label: 'Saturation flux density', kind: as('count', 'T') },
  windingResistanceOhm: { label: 'Winding resistance', kind: as('count', 'Ω') },
  loadOhm: { label: 'Load resistance', kind: as('count', 'Ω') },
  loadVoltageRmsV: { label: 'Load voltage (rms)', kind: as('count', 'V') },
  converterEfficiency: { label: 'Converter efficiency', kind: as('share') },
  chargeEfficiency: { label: 'Charge efficiency', kind: as('share') },
  reservePercent: { label: 'Reserve', kind: as('percent') },
  chargeToPercent: { label: 'Charge to', kind: as('percent') },
  coreMaterial: { label: 'Core material', kind: as('text') },
  sortOrder: { label: 'Order in lists', kind: as('count') },
  accepted: { label: 'Readings accepted', kind: as('count') },
  rows: { label: 'Rows', kind: as('count') },
  pointCount: { label: 'Points', kind: as('count') },
};

/** Bookkeeping that changes on every write; never shown as a change. */
const BOOKKEEPING = new Set(['version', 'updatedAt', 'createdAt', 'createdById', 'id']);

// Unit suffixes of the API's field names (SI on the wire, api.md) → what the value is.
const SUFFIXES: Array<[suffix: RegExp, kind: Kind]> = [
  [/Mm2$/, as('count', 'mm²')],
  [/Mm$/, q('diameter')],
  [/Kv$/, q('voltage')],
  [/Mps$/, q('speed')],
  [/Kg$/, q('mass')],
  [/Wh$/, q('energy')],
  [/Min$/, { as: 'count', unit: 'min' }],
  [/Percent$/, as('percent')],
  [/Deg$/, as('degrees')],
  [/Hz$/, as('count', 'Hz')],
  [/Ohm$/, as('count', 'Ω')],
  [/At$/, as('datetime')],
  [/Id$/, as('id')],
  [/C$/, q('temperature')],
  [/W$/, q('power')],
  [/A$/, q('current')],
  [/M$/, q('length')],
];

/** "gripperMaxDiameterMm" → "Gripper max diameter"; a unit suffix is dropped (the value carries its unit). */
export function fieldLabel(key: string): string {
  if (FIELDS[key]) return FIELDS[key].label;
  const bare = key.replace(/(Mm2|Mm|Kv|Mps|Kg|Wh|Min|Percent|Deg|Hz|Ohm|Id|C|W|A|M)$/, '') || key;
  return codeWords(bare).replace(/\bmax\b/, 'maximum').replace(/\bmin\b/, 'minimum');
}

function kindOf(key: string): Kind {
  if (FIELDS[key]) return FIELDS[key].kind;
  for (const [re, kind] of SUFFIXES) if (re.test(key)) return kind;
  return as('text');
}

const isRecord = (v: unknown): v is Record<string, unknown> => !!v && typeof v === 'object' && !Array.isArray(v);
const empty = (v: unknown) => v === null || v === undefined || v === '';
const CODE = /^[a-z0-9]+(?:[-_.][a-z0-9]+)*$/;
const ID = /^[0-9a-f]{8}-[0-9a-f]{4}-|^[0-9A-HJKMNP-TV-Z]{26}$/i;

function bytes(n: number): string {
  if (n < 1024) return `${n} B`;
  if (n < 1024 * 1024) return `${Math.round(n / 1024)} KB`;
  return `${(n / (1024 * 1024)).toFixed(1)} MB`;
}

function mime(type: string): string {
  const sub = type.split('/')[1] ?? type;
  const name: Record<string, string> = { jpeg: 'JPEG', png: 'PNG', webp: 'WebP', heic: 'HEIC', csv: 'CSV', 'gpx+xml': 'GPX' };
  return `${name[sub] ?? sub.toUpperCase()} ${type.startsWith('image/') ? 'image' : 'file'}`;
}

function geometry(v: unknown): string {
  if (!isRecord(v)) return 'a shape';
  const ring = Array.isArray(v.coordinates) && Array.isArray(v.coordinates[0]) ? (v.coordinates[0] as unknown[]) : null;
  if (v.type === 'Polygon' && ring) return `an area with ${Math.max(0, ring.length - 1)} corners`;
  if (v.type === 'MultiPolygon' && Array.isArray(v.coordinates)) return `${v.coordinates.length} areas`;
  return 'a shape';
}

function hazardWords(h: unknown, opts: DescribeOptions): string {
  if (!isRecord(h)) return 'a hazard';
  const kind = typeof h.kindId === 'string' ? (opts.nameOf?.('kindId', h.kindId) ?? 'Hazard') : 'Hazard';
  const parts = [kind];
  if (typeof h.severity === 'string') parts.push(`(${h.severity})`);
  parts.push(typeof h.positionAlongM === 'number' ? `at ${formatQuantity(h.positionAlongM, 'length', opts.system)}` : 'along the whole span');
  return parts.join(' ');
}

/** A code by its label in the product's own table, or in words when the table does not know it. */
const labelled = (labels: Readonly<Record<string, string>>, code: string) => labels[code] ?? codeWords(code);

/** One value in words for the field `key`. */
export function valueWords(key: string, v: unknown, opts: DescribeOptions): string {
  if (empty(v)) return '—';
  const kind = kindOf(key);
  if ('quantity' in kind) {
    return typeof v === 'number' ? formatQuantity(v, kind.quantity, opts.system, { digits: kind.digits }) : String(v);
  }
  switch (kind.as) {
    case 'id': {
      const name = typeof v === 'string' ? opts.nameOf?.(key, v) : undefined;
      return name ?? `another ${fieldLabel(key).toLowerCase()}`;
    }
    case 'status':
      return typeof v === 'string' ? labelled(SPAN_STATUS_LABELS, v) : String(v);
    case 'terrain':
      return typeof v === 'string' ? labelled(TERRAIN_LABELS, v) : String(v);
    case 'roles':
      return Array.isArray(v) ? v.map((r) => labelled(ROLE_LABELS, String(r))).join(', ') || 'none' : String(v);
    case 'bool':
      return v ? 'Yes' : 'No';
    case 'date':
      return date(String(v));
    case 'datetime':
      return typeof v === 'string' || typeof v === 'number' ? dateTime(v) : '—';
    case 'share':
      return typeof v === 'number' ? percent(v) : String(v);
    case 'percent':
      return typeof v === 'number' ? `${number(v)} %` : String(v);
    case 'degrees':
      return typeof v === 'number' ? `${number(v)}°` : String(v);
    case 'coordinate': {
      // Five decimals (about a metre), trailing zeros dropped, with the hemisphere: "30.08° S".
      if (typeof v !== 'number') return String(v);
      const hemi = key.startsWith('lat') ? (v < 0 ? 'S' : 'N') : v < 0 ? 'W' : 'E';
      return `${Number(Math.abs(v).toFixed(5))}° ${hemi}`;
    }
    case 'bytes':
      return typeof v === 'number' ? bytes(v) : String(v);
    case 'mime':
      return mime(String(v));
    case 'geometry':
      return geometry(v);
    case 'hazards':
      return Array.isArray(v) ? (v.length ? v.map((h) => hazardWords(h, opts)).join('; ') : 'none') : '—';
    case 'count':
      if (Array.isArray(v)) return `${v.length} value${v.length === 1 ? '' : 's'}`;
      return typeof v === 'number' ? `${number(v)}${kind.unit ? ` ${kind.unit}` : ''}` : String(v);
    case 'code':
      return typeof v === 'string' ? codeWords(v) : String(v);
    case 'text':
    default:
      if (typeof v === 'number') return number(v);
      if (typeof v === 'boolean') return v ? 'Yes' : 'No';
      if (typeof v === 'string') {
        if (ID.test(v)) return 'another record';
        if (/^\d{4}-\d{2}-\d{2}T/.test(v)) return dateTime(v);
        return CODE.test(v) && /[-_.]/.test(v) ? codeWords(v) : v;
      }
      if (Array.isArray(v)) return v.every((x) => typeof x !== 'object') ? v.map((x) => valueWords(key, x, opts)).join(', ') || 'none' : `${v.length} item${v.length === 1 ? '' : 's'}`;
      return '—';
  }
}

function changesOf(b: Record<string, unknown>, a: Record<string, unknown>, opts: DescribeOptions, prefix: string): FieldChange[] {
  const keys = [...new Set([...Object.keys(b), ...Object.keys(a)])].filter((k) => !BOOKKEEPING.has(k));
  const out: FieldChange[] = [];
  for (const k of keys) {
    const bv = b[k];
    const av = a[k];
    if (JSON.stringify(bv ?? null) === JSON.stringify(av ?? null)) continue;
    // Nested records (the conductor, scoring weights) are read field by field, each with its own label.
    if ((isRecord(bv) || isRecord(av)) && k !== 'geometry') {
      out.push(...changesOf(isRecord(bv) ? bv : {}, isRecord(av) ? av : {}, opts, `${prefix}${fieldLabel(k)} · `));
      continue;
    }
    out.push({ field: `${prefix}${fieldLabel(k)}`, before: valueWords(k, bv, opts), after: valueWords(k, av, opts) });
  }
  return out;
}

/** The fields an audit entry changed, in words; bookkeeping left out; an entry with no before (a creation) lists what was set. */
export function describeChanges(before: unknown, after: unknown, opts: DescribeOptions): FieldChange[] {
  if (!isRecord(before) && !isRecord(after)) return [];
  const list = changesOf(isRecord(before) ? before : {}, isRecord(after) ? after : {}, opts, '');
  // A unit-less field that still shows the same words on both sides (e.g. an id whose name is unknown) says "changed".
  return list.map((c) => (c.before === c.after ? { ...c, before: '', after: 'changed' } : c));
}

const ACTIONS: Record<string, string> = {
  'invitation.create': 'Invited',
  'invitation.resend': 'Sent the invitation again',
  'invitation.revoke': 'Withdrew the invitation',
  'invitation.accept': 'Accepted the invitation',
  'user.update': 'Changed the account',
  'user.deactivate': 'Deactivated the account',
  'user.reactivate': 'Reactivated the account',
  'crew.create': 'Created the crew',
  'crew.update': 'Renamed the crew',
  'crew.delete': 'Deleted the crew',
  'account.update': 'Changed own settings',
  'account.password-change': 'Changed own password',
  'account.password-reset-request': 'Asked for a password reset',
  'account.password-reset': 'Reset the password',
  'span.create': 'Recorded the span',
  'span.update': 'Edited the span',
  'span.submit': 'Submitted the span for review',
  'span.approve': 'Approved the span',
  'span.return': 'Returned the span to the surveyor',
  'span.suspend': 'Suspended the span',
  'span.reinstate': 'Reinstated the span',
  'span.import': 'Imported the span',
  'span.import-update': 'Updated the span from an import',
  'span.structure-moved': 'A structure of the span moved',
  'line.create': 'Created the line',
  'line.update': 'Edited the line',
  'line.import-update': 'Updated the line from an import',
  'structure.create': 'Placed the structure',
  'structure.update': 'Edited the structure',
  'structure.move': 'Moved the structure',
  'structure.import-update': 'Updated the structure from an import',
  'zone.create': 'Drew the no-perch zone',
  'zone.update': 'Changed the no-perch zone',
  'zone.delete': 'Removed the no-perch zone',
  'photo.upload': 'Added a photo',
  'photo.update': 'Changed a photo',
  'photo.delete': 'Removed a photo',
  'hazard-kind.create': 'Added a hazard kind',
  'hazard-kind.update': 'Changed a hazard kind',
  'harvester-profile.create': 'Added a harvester profile',
  'harvester-profile.update': 'Changed a harvester profile',
  'harvester-profile.delete': 'Removed a harvester profile',
  'drone-profile.create': 'Added a drone profile',
  'drone-profile.update': 'Changed a drone profile',
  'drone-profile.delete': 'Removed a drone profile',
  'bench-test.create': 'Recorded a bench test',
  'bench-test.delete': 'Removed a bench test',
  'scoring-settings.update': 'Changed the scoring settings',
  'flight-record.upload': 'Uploaded a flight record',
};

/** "span.approve" → "Approved the span"; an action not listed reads as words ("mission.authorise" → "Mission: authorise"). */
export function actionLabel(action: string): string {
  if (ACTIONS[action]) return ACTIONS[action];
  const [record, ...rest] = action.split('.');
  return rest.length ? `${codeWords(record)}: ${codeWords(rest.join(' ')).toLowerCase()}` : codeWords(action);
}

/** "harvester-profile" → "Harvester profile". */
export function recordTypeLabel(type: string): string {
  return codeWords(type);
}
