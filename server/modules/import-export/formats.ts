// Reading and writing the line-inventory file formats: CSV (one span a row), GeoJSON (structure Points and span LineStrings), KML (export).
import Papa from 'papaparse';
import { SPAN_STATUS_COLOURS, kmlColour } from '#shared/span-status-colours.ts';
import { INVENTORY_CSV_COLUMNS, INVENTORY_CSV_EXPORT_ONLY_COLUMNS, type Span as SpanView, type Structure as StructureView, type Line as LineView } from '#shared/schemas/inventory.ts';

/** One row of an import file, before validation: values as given (undefined = not in the file, null = empty). */
export interface RawRow {
  row: number;
  subject: string;
  reasons: string[];
  line?: { name: string; given: Record<string, unknown> };
  structures: { role: 'from' | 'to' | 'point'; label: string; given: Record<string, unknown> }[];
  span?: { fromLabel: string; toLabel: string; given: Record<string, unknown> };
}

/** How a field of a record is named in the file, for the row report. */
export type FieldNamer = (record: 'line' | 'from' | 'to' | 'point' | 'span', path: string) => string;

// ---------- CSV ----------

const LINE_COLS: Record<string, string> = {
  owner: 'line_owner',
  voltageKv: 'voltage_kv',
  frequencyHz: 'frequency_hz',
  phases: 'phases',
  loadTypicalA: 'load_typical_a',
  loadMinA: 'load_min_a',
  loadPeakA: 'load_peak_a',
  loadProfileA: 'load_profile_a',
};
const STRUCTURE_COLS: Record<string, string> = { lat: 'lat', lon: 'lon', kind: 'kind', attachmentHeightM: 'attachment_height_m' };
const SPAN_COLS: Record<string, string> = {
  'conductor.codeWord': 'conductor_code_word',
  'conductor.size': 'conductor_size',
  'conductor.material': 'conductor_material',
  'conductor.diameterMm': 'conductor_diameter_mm',
  'conductor.resistanceLowOhmPerM': 'conductor_resistance_low_ohm_per_m',
  'conductor.tempLowC': 'conductor_temp_low_c',
  'conductor.resistanceHighOhmPerM': 'conductor_resistance_high_ohm_per_m',
  'conductor.tempHighC': 'conductor_temp_high_c',
  phasePosition: 'phase_position',
  clearanceM: 'clearance_m',
  lowestClearanceM: 'lowest_clearance_m',
  lowestClearanceAlongM: 'lowest_clearance_along_m',
  terrain: 'terrain',
  loadCurrentA: 'load_current_a',
  surveyDate: 'survey_date',
  hazards: 'hazards',
};

export const csvFieldName: FieldNamer = (record, path) => {
  if (record === 'line') return LINE_COLS[path] ?? (path === 'name' ? 'line_name' : `line ${path}`);
  if (record === 'from' || record === 'to' || record === 'point') {
    const col = STRUCTURE_COLS[path];
    return col ? `${record}_${col}` : `${record} structure ${path}`;
  }
  const top = path.split('.').slice(0, 2).join('.');
  if (path.startsWith('hazards.')) return `hazards (${path.slice('hazards.'.length)})`;
  return SPAN_COLS[top] ?? SPAN_COLS[path] ?? path;
};

/** A cell as a number: '' → null; text that is not a number stays text so validation names it. */
function num(v: string | undefined): unknown {
  if (v === undefined) return undefined;
  const t = v.trim();
  if (t === '') return null;
  const n = Number(t);
  return Number.isFinite(n) ? n : t;
}
/**
 * Spreadsheets run a cell that starts with = + - @ (or a tab / carriage return) as a formula. Exported text cells
 * that would get a leading apostrophe, which import takes off again, so a round trip keeps the text.
 */
export function guardCell(v: string): string {
  return /^[=+\-@\t\r]/.test(v) ? `'${v}` : v;
}
export function unguardCell(v: string): string {
  return /^'[=+\-@\t\r]/.test(v) ? v.slice(1) : v;
}

function text(v: string | undefined): string | null | undefined {
  if (v === undefined) return undefined;
  const t = v.trim();
  return t === '' ? null : t;
}

/** The header's problem (a required column missing) as the one row of the report, or null. */
export function csvHeaderProblem(fields: ReadonlySet<string>): RawRow | null {
  const missing = ['line_name', 'from_label', 'to_label'].filter((c) => !fields.has(c));
  if (!missing.length) return null;
  return { row: 0, subject: 'header', reasons: [`The header lacks the column(s) ${missing.join(', ')}; the columns are: ${INVENTORY_CSV_COLUMNS.join(', ')}`], structures: [] };
}

/** A CSV header cell as the import names its column. */
export const csvHeaderName = (h: string) => h.trim().toLowerCase();

/** One data row (numbered from 1) of a CSV file as the import reads it; `parseErrors` are the reader's words for it. */
export function csvRawRow(r: Record<string, string | undefined>, row: number, fields: ReadonlySet<string>, parseErrors: readonly string[] = []): RawRow {
  const has = (c: string) => fields.has(c);
  const get = (c: string) => (has(c) ? unguardCell(r[c] ?? '') : undefined);
  const reasons = [...parseErrors];
  const lineName = (get('line_name') ?? '').trim();
  const fromLabel = (get('from_label') ?? '').trim();
  const toLabel = (get('to_label') ?? '').trim();
  if (!lineName) reasons.push('line_name: enter the line name');
  if (!fromLabel) reasons.push('from_label: enter the from-structure label');
  if (!toLabel) reasons.push('to_label: enter the to-structure label');

  const lineGiven: Record<string, unknown> = {
    owner: text(get('line_owner')),
    voltageKv: num(get('voltage_kv')),
    frequencyHz: num(get('frequency_hz')),
    phases: num(get('phases')),
    loadTypicalA: num(get('load_typical_a')),
    loadMinA: num(get('load_min_a')),
    loadPeakA: num(get('load_peak_a')),
  };
  const profile = get('load_profile_a');
  if (profile !== undefined) lineGiven.loadProfileA = profile.trim() === '' ? null : profile.split(/[;\s]+/).filter(Boolean).map((x) => num(x));

  const structure = (p: 'from' | 'to') => ({
    lat: num(get(`${p}_lat`)),
    lon: num(get(`${p}_lon`)),
    kind: text(get(`${p}_kind`)),
    attachmentHeightM: num(get(`${p}_attachment_height_m`)),
  });

  const spanGiven: Record<string, unknown> = {
    phasePosition: text(get('phase_position')),
    clearanceM: num(get('clearance_m')),
    lowestClearanceM: num(get('lowest_clearance_m')),
    lowestClearanceAlongM: num(get('lowest_clearance_along_m')),
    terrain: text(get('terrain')),
    loadCurrentA: num(get('load_current_a')),
    surveyDate: text(get('survey_date')),
  };
  const conductorCols = ['conductor_code_word', 'conductor_size', 'conductor_material', 'conductor_diameter_mm', 'conductor_resistance_low_ohm_per_m', 'conductor_temp_low_c', 'conductor_resistance_high_ohm_per_m', 'conductor_temp_high_c'];
  if (conductorCols.some(has)) {
    const c = {
      codeWord: text(get('conductor_code_word')),
      size: text(get('conductor_size')),
      material: text(get('conductor_material')),
      diameterMm: num(get('conductor_diameter_mm')),
      resistanceLowOhmPerM: num(get('conductor_resistance_low_ohm_per_m')),
      tempLowC: num(get('conductor_temp_low_c')),
      resistanceHighOhmPerM: num(get('conductor_resistance_high_ohm_per_m')),
      tempHighC: num(get('conductor_temp_high_c')),
    };
    const any = Object.values(c).some((v) => v !== null && v !== undefined);
    // A catalogue code word fills the rest: the other conductor cells are then informative only.
    spanGiven.conductor = !any ? null : c.codeWord ? { codeWord: c.codeWord } : Object.fromEntries(Object.entries(c).filter(([, v]) => v !== undefined && v !== null));
  }
  const hz = get('hazards');
  if (hz !== undefined) {
    if (hz.trim() === '') spanGiven.hazards = [];
    else {
      try {
        spanGiven.hazards = JSON.parse(hz);
      } catch {
        reasons.push('hazards: not a JSON list, e.g. [{"kindId":"road-crossing","severity":"high"}]');
      }
    }
  }
  return {
    row,
    subject: `${lineName || '?'}: ${fromLabel || '?'} → ${toLabel || '?'}`,
    reasons,
    line: lineName ? { name: lineName, given: lineGiven } : undefined,
    structures: [
      ...(fromLabel ? [{ role: 'from' as const, label: fromLabel, given: structure('from') }] : []),
      ...(toLabel ? [{ role: 'to' as const, label: toLabel, given: structure('to') }] : []),
    ],
    span: fromLabel && toLabel ? { fromLabel, toLabel, given: spanGiven } : undefined,
  };
}

export function parseCsv(source: string): RawRow[] {
  const parsed = Papa.parse<Record<string, string>>(source.replace(/^\uFEFF/, ''), {
    header: true,
    skipEmptyLines: 'greedy',
    transformHeader: csvHeaderName,
  });
  const fields = new Set(parsed.meta.fields ?? []);
  const problem = csvHeaderProblem(fields);
  if (problem) return [problem];
  const errorsByRow = new Map<number, string[]>();
  for (const e of parsed.errors) {
    if (e.row === undefined || e.row === null) continue;
    errorsByRow.set(e.row, [...(errorsByRow.get(e.row) ?? []), e.message]);
  }
  return parsed.data.map((r, i) => csvRawRow(r, i + 1, fields, errorsByRow.get(i) ?? []));
}

function csvNumber(n: number | null | undefined) {
  return n === null || n === undefined ? '' : String(n);
}

export function spansToCsv(spans: SpanView[], lines: Map<string, LineView>, structures: Map<string, StructureView>): string {
  const header = [...INVENTORY_CSV_COLUMNS, ...INVENTORY_CSV_EXPORT_ONLY_COLUMNS];
  const rows = spans.map((s) => {
    const l = lines.get(s.lineId)!;
    const from = structures.get(s.fromStructureId)!;
    const to = structures.get(s.toStructureId)!;
    const c = s.conductor;
    const record: Record<(typeof header)[number], string> = {
      line_name: guardCell(l.name),
      line_owner: guardCell(l.owner),
      voltage_kv: csvNumber(l.voltageKv),
      frequency_hz: csvNumber(l.frequencyHz),
      phases: csvNumber(l.phases),
      load_typical_a: csvNumber(l.loadTypicalA),
      load_min_a: csvNumber(l.loadMinA),
      load_peak_a: csvNumber(l.loadPeakA),
      load_profile_a: l.loadProfileA ? l.loadProfileA.join(';') : '',
      from_label: guardCell(from.label),
      from_lat: csvNumber(from.lat),
      from_lon: csvNumber(from.lon),
      from_kind: from.kind,
      from_attachment_height_m: csvNumber(from.attachmentHeightM),
      to_label: guardCell(to.label),
      to_lat: csvNumber(to.lat),
      to_lon: csvNumber(to.lon),
      to_kind: to.kind,
      to_attachment_height_m: csvNumber(to.attachmentHeightM),
      conductor_code_word: c?.codeWord ?? '',
      conductor_size: guardCell(c?.size ?? ''),
      conductor_material: c?.material ?? '',
      conductor_diameter_mm: csvNumber(c?.diameterMm),
      conductor_resistance_low_ohm_per_m: csvNumber(c?.resistanceLowOhmPerM),
      conductor_temp_low_c: csvNumber(c?.tempLowC),
      conductor_resistance_high_ohm_per_m: csvNumber(c?.resistanceHighOhmPerM),
      conductor_temp_high_c: csvNumber(c?.tempHighC),
      phase_position: guardCell(s.phasePosition ?? ''),
      clearance_m: csvNumber(s.clearanceM),
      lowest_clearance_m: csvNumber(s.lowestClearanceM),
      lowest_clearance_along_m: csvNumber(s.lowestClearanceAlongM),
      terrain: s.terrain ?? '',
      load_current_a: s.loadCurrentSource === 'span' ? csvNumber(s.loadCurrentA) : '',
      survey_date: s.surveyDate ?? '',
      hazards: s.hazards.length ? JSON.stringify(s.hazards.map(({ kindId, severity, positionAlongM, note }) => ({ kindId, severity, positionAlongM, note }))) : '',
      span_id: s.id,
      status: s.status,
      length_m: csvNumber(s.lengthM),
      harvest_w: csvNumber(s.assessment?.harvestW),
      score: csvNumber(s.assessment?.score),
      perchable: s.assessment ? String(s.assessment.perchable) : '',
    };
    return header.map((h) => record[h]);
  });
  return Papa.unparse({ fields: [...header], data: rows }, { newline: '\r\n' }) + '\r\n';
}

// ---------- GeoJSON ----------

const GEO_SPAN_PROPS: Record<string, string> = { hazards: 'hazards' };
export const geojsonFieldName: FieldNamer = (record, path) => {
  if (record === 'line') return path === 'name' ? 'lineName' : path === 'owner' ? 'lineOwner' : path;
  if (record === 'from' || record === 'to') {
    if (path === 'lat' || path === 'lon') return `coordinates (${record} end, ${path})`;
    return `${record}${path.charAt(0).toUpperCase()}${path.slice(1)}`;
  }
  if (record === 'point') return path === 'lat' || path === 'lon' ? `coordinates (${path})` : path;
  return GEO_SPAN_PROPS[path] ?? path;
};

const LINE_PROPS = ['voltageKv', 'frequencyHz', 'phases', 'loadTypicalA', 'loadMinA', 'loadPeakA', 'loadProfileA'] as const;
const SPAN_PROPS = ['conductor', 'phasePosition', 'clearanceM', 'lowestClearanceM', 'lowestClearanceAlongM', 'terrain', 'loadCurrentA', 'surveyDate', 'hazards'] as const;

function isPosition(p: unknown): p is [number, number] {
  return Array.isArray(p) && p.length >= 2 && typeof p[0] === 'number' && typeof p[1] === 'number';
}

export function parseGeoJson(source: string): RawRow[] {
  let doc: any;
  try {
    doc = JSON.parse(source);
  } catch (e) {
    return [{ row: 0, subject: 'file', reasons: [`Not valid JSON: ${(e as Error).message}`], structures: [] }];
  }
  const features: any[] = doc?.type === 'FeatureCollection' && Array.isArray(doc.features) ? doc.features : doc?.type === 'Feature' ? [doc] : [];
  if (!features.length) return [{ row: 0, subject: 'file', reasons: ['Expected a GeoJSON FeatureCollection of structure Points and span LineStrings'], structures: [] }];
  return features.map((f, i): RawRow => {
    const row = i + 1;
    const p = f?.properties ?? {};
    const g = f?.geometry;
    const lineName = typeof p.lineName === 'string' ? p.lineName.trim() : '';
    const reasons: string[] = [];
    if (!lineName) reasons.push('lineName: enter the line name');
    const line = lineName ? { name: lineName, given: { owner: p.lineOwner, ...Object.fromEntries(LINE_PROPS.map((k) => [k, p[k]])) } } : undefined;
    if (g?.type === 'Point') {
      const label = typeof p.label === 'string' ? p.label.trim() : '';
      if (!label) reasons.push('label: enter the structure label');
      if (!isPosition(g.coordinates)) reasons.push('coordinates: expected [lon, lat]');
      const [lon, lat] = isPosition(g.coordinates) ? g.coordinates : [undefined, undefined];
      return {
        row,
        subject: `${lineName || '?'}: structure ${label || '?'}`,
        reasons,
        line,
        structures: label ? [{ role: 'point', label, given: { lat, lon, kind: p.kind, attachmentHeightM: p.attachmentHeightM } }] : [],
      };
    }
    if (g?.type === 'LineString') {
      const fromLabel = typeof p.fromLabel === 'string' ? p.fromLabel.trim() : '';
      const toLabel = typeof p.toLabel === 'string' ? p.toLabel.trim() : '';
      if (!fromLabel) reasons.push('fromLabel: enter the from-structure label');
      if (!toLabel) reasons.push('toLabel: enter the to-structure label');
      const coords = Array.isArray(g.coordinates) ? g.coordinates : [];
      if (coords.length < 2 || !isPosition(coords[0]) || !isPosition(coords[coords.length - 1])) reasons.push('coordinates: a span needs [from, to] positions as [lon, lat]');
      const first = isPosition(coords[0]) ? coords[0] : [undefined, undefined];
      const last = isPosition(coords[coords.length - 1]) ? coords[coords.length - 1] : [undefined, undefined];
      return {
        row,
        subject: `${lineName || '?'}: ${fromLabel || '?'} → ${toLabel || '?'}`,
        reasons,
        line,
        structures: [
          ...(fromLabel ? [{ role: 'from' as const, label: fromLabel, given: { lon: first[0], lat: first[1], kind: p.fromKind, attachmentHeightM: p.fromAttachmentHeightM } }] : []),
          ...(toLabel ? [{ role: 'to' as const, label: toLabel, given: { lon: last[0], lat: last[1], kind: p.toKind, attachmentHeightM: p.toAttachmentHeightM } }] : []),
        ],
        span: fromLabel && toLabel ? { fromLabel, toLabel, given: Object.fromEntries(SPAN_PROPS.map((k) => [k, p[k]])) } : undefined,
      };
    }
    return { row, subject: `feature ${row}`, reasons: [`geometry: expected a Point (structure) or LineString (span), got ${g?.type ?? 'none'}`], structures: [] };
  });
}

export function spansToGeoJson(spans: SpanView[], lines: Map<string, LineView>, structures: Map<string, StructureView>) {
  const features: any[] = [];
  const seen = new Set<string>();
  for (const s of spans) {
    const l = lines.get(s.lineId)!;
    for (const id of [s.fromStructureId, s.toStructureId]) {
      if (seen.has(id)) continue;
      seen.add(id);
      const st = structures.get(id)!;
      features.push({
        type: 'Feature',
        id: st.id,
        geometry: { type: 'Point', coordinates: [st.lon, st.lat] },
        properties: { featureType: 'structure', id: st.id, lineName: l.name, label: st.label, kind: st.kind, attachmentHeightM: st.attachmentHeightM },
      });
    }
  }
  for (const s of spans) {
    const l = lines.get(s.lineId)!;
    const from = structures.get(s.fromStructureId)!;
    const to = structures.get(s.toStructureId)!;
    const c = s.conductor;
    features.push({
      type: 'Feature',
      id: s.id,
      geometry: { type: 'LineString', coordinates: [[from.lon, from.lat], [to.lon, to.lat]] },
      properties: {
        featureType: 'span',
        id: s.id,
        status: s.status,
        lineName: l.name,
        lineOwner: l.owner,
        voltageKv: l.voltageKv,
        frequencyHz: l.frequencyHz,
        phases: l.phases,
        loadTypicalA: l.loadTypicalA,
        loadMinA: l.loadMinA,
        loadPeakA: l.loadPeakA,
        loadProfileA: l.loadProfileA,
        fromLabel: from.label,
        fromKind: from.kind,
        fromAttachmentHeightM: from.attachmentHeightM,
        toLabel: to.label,
        toKind: to.kind,
        toAttachmentHeightM: to.attachmentHeightM,
        lengthM: s.lengthM,
        conductor: c
          ? c.codeWord
            ? { codeWord: c.codeWord, size: c.size, material: c.material, diameterMm: c.diameterMm }
            : { size: c.size, material: c.material, diameterMm: c.diameterMm, resistanceLowOhmPerM: c.resistanceLowOhmPerM, tempLowC: c.tempLowC, resistanceHighOhmPerM: c.resistanceHighOhmPerM, tempHighC: c.tempHighC }
          : null,
        phasePosition: s.phasePosition,
        clearanceM: s.clearanceM,
        lowestClearanceM: s.lowestClearanceM,
        lowestClearanceAlongM: s.lowestClearanceAlongM,
        terrain: s.terrain,
        loadCurrentA: s.loadCurrentSource === 'span' ? s.loadCurrentA : null,
        surveyDate: s.surveyDate,
        hazards: s.hazards.map(({ kindId, severity, positionAlongM, note }) => ({ kindId, severity, positionAlongM, note })),
        harvestW: s.assessment?.harvestW ?? null,
        score: s.assessment?.score ?? null,
        perchable: s.assessment?.perchable ?? null,
      },
    });
  }
  return { type: 'FeatureCollection', features };
}

// ---------- KML (export only) ----------

/** Escapes text for XML element content and attribute values. */
export function xmlEscape(s: string): string {
  return s.replace(/[<>&'"]/g, (c) => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', "'": '&apos;', '"': '&quot;' })[c]!).replace(/[\u0000-\u0008\u000B\u000C\u000E-\u001F]/g, '');
}

export function spansToKml(spans: SpanView[], lines: Map<string, LineView>, structures: Map<string, StructureView>, title: string): string {
  const out: string[] = [];
  out.push('<?xml version="1.0" encoding="UTF-8"?>');
  out.push('<kml xmlns="http://www.opengis.net/kml/2.2">');
  out.push('<Document>');
  out.push(`<name>${xmlEscape(title)}</name>`);
  // The app's own status palette, in KML's aabbggrr byte order.
  for (const [status, hex] of Object.entries(SPAN_STATUS_COLOURS)) {
    out.push(`<Style id="span-${status}"><LineStyle><color>${kmlColour(hex)}</color><width>4</width></LineStyle></Style>`);
  }
  const byLine = new Map<string, SpanView[]>();
  for (const s of spans) byLine.set(s.lineId, [...(byLine.get(s.lineId) ?? []), s]);
  for (const [lineId, list] of byLine) {
    const l = lines.get(lineId)!;
    out.push('<Folder>');
    out.push(`<name>${xmlEscape(`${l.name} (${l.voltageKv} kV)`)}</name>`);
    for (const s of list) {
      const from = structures.get(s.fromStructureId)!;
      const to = structures.get(s.toStructureId)!;
      const data: [string, string][] = [
        ['spanId', s.id],
        ['status', s.status],
        ['lineName', l.name],
        ['fromLabel', from.label],
        ['toLabel', to.label],
        ['lengthM', s.lengthM.toFixed(2)],
        ['conductor', s.conductor?.codeWord ?? s.conductor?.size ?? ''],
        ['diameterMm', s.conductor?.diameterMm == null ? '' : String(s.conductor.diameterMm)],
        ['clearanceM', s.clearanceM == null ? '' : String(s.clearanceM)],
        ['lowestClearanceM', s.lowestClearanceM == null ? '' : String(s.lowestClearanceM)],
        ['lowestClearanceAlongM', s.lowestClearanceAlongM == null ? '' : String(s.lowestClearanceAlongM)],
        ['loadCurrentA', String(s.loadCurrentA)],
        ['harvestW', s.assessment ? s.assessment.harvestW.toFixed(2) : ''],
        ['score', s.assessment ? s.assessment.score.toFixed(1) : ''],
        ['hazards', s.hazards.map((h) => `${h.kindId} (${h.severity})`).join(', ')],
      ];
      out.push('<Placemark>');
      out.push(`<name>${xmlEscape(`${from.label} → ${to.label}`)}</name>`);
      out.push(`<styleUrl>#span-${xmlEscape(s.status)}</styleUrl>`);
      out.push('<ExtendedData>' + data.map(([k, v]) => `<Data name="${xmlEscape(k)}"><value>${xmlEscape(v)}</value></Data>`).join('') + '</ExtendedData>');
      out.push(`<LineString><tessellate>1</tessellate><coordinates>${from.lon},${from.lat},0 ${to.lon},${to.lat},0</coordinates></LineString>`);
      out.push('</Placemark>');
    }
    out.push('</Folder>');
  }
  out.push('</Document>');
  out.push('</kml>');
  return out.join('\n') + '\n';
}
