// Stored assessments written in bulk (the background rescoring path). The column list and the value encoding live
// here: on SQLite what the ORM stores there (booleans as 0/1, dates as epoch milliseconds, JSON as text); on
// PostgreSQL booleans and timestamps as themselves, JSON as text that the jsonb column parses.
import type { EntityManager } from '@mikro-orm/core';
import type { Assessment } from '../modules/assessment/assessment.entity.ts';
import { inTransaction, marks, rowsPerStatement } from './bulk.ts';
import { changeCounter, noteAssessmentOnlyChanges } from './data-version.ts';
import { sql } from './query.ts';
import { isPostgres, jsonTextField } from './dialect.ts';
import { encodeResult, readStoredResult } from '../modules/assessment/result-codec.ts';

const COLUMNS: [string, keyof Assessment][] = [
  ['span_id', 'spanId'],
  ['harvester_profile_id', 'harvesterProfileId'],
  ['drone_profile_id', 'droneProfileId'],
  ['perchable', 'perchable'],
  ['score', 'score'],
  ['harvest_w', 'harvestW'],
  ['charge_time_min', 'chargeTimeMin'],
  ['conductor_temp_c', 'conductorTempC'],
  ['ampacity_a', 'ampacityA'],
  ['result', 'result'],
  ['inputs', 'inputs'],
  ['method_version', 'methodVersion'],
  ['settings_version', 'settingsVersion'],
  ['harvester_version', 'harvesterVersion'],
  ['drone_version', 'droneVersion'],
  ['computed_at', 'computedAt'],
];

/** JSON text of an object, once per object: the rows of one span share their inputs object. */
type TextCache = WeakMap<object, string>;

function encode(v: unknown, pg: boolean, texts: TextCache): unknown {
  if (v === undefined || v === null) return null;
  if (typeof v === 'boolean') return pg ? v : v ? 1 : 0;
  if (v instanceof Date) return pg ? v.toISOString() : v.getTime();
  if (typeof v === 'object') {
    let text = texts.get(v);
    if (text === undefined) texts.set(v, (text = JSON.stringify(v)));
    return text;
  }
  return v;
}

const DELETE_CHUNK = 900;

/** The statements of a replace, with their values already encoded (built on the main thread ahead of the write). */
export interface AssessmentWrite {
  pg: boolean;
  spanIds: readonly string[];
  inserts: { sql: string; params: unknown[] }[];
}

/**
 * Encodes `rows` for a replace of the given spans' stored rows: multi-row insert statements with their bound values.
 * Nothing touches the database, so the next batch can be encoded while the previous one is written.
 */
export function encodeAssessmentWrite(em: EntityManager, spanIds: readonly string[], rows: readonly Partial<Assessment>[]): AssessmentWrite {
  const per = rowsPerStatement(COLUMNS.length);
  const pg = isPostgres(em);
  const texts: TextCache = new WeakMap();
  const inserts: AssessmentWrite['inserts'] = [];
  for (let i = 0; i < rows.length; i += per) {
    const end = Math.min(rows.length, i + per);
    const params: unknown[] = new Array((end - i) * COLUMNS.length);
    let k = 0;
    // The result in its stored (compact) form, as the entity's column type writes it.
    for (let j = i; j < end; j++) {
      const r = rows[j];
      for (const [, prop] of COLUMNS) params[k++] = encode(prop === 'result' ? encodeResult(r.result) : r[prop], pg, texts);
    }
    inserts.push({ sql: insertOf(end - i), params });
  }
  return { pg, spanIds, inserts };
}

const insertSqlBySize = new Map<number, string>();
function insertOf(n: number): string {
  let text = insertSqlBySize.get(n);
  if (text === undefined) {
    text = `insert into "assessments" (${COLUMNS.map(([c]) => `"${c}"`).join(',')}) values ${Array.from({ length: n }, () => `(${marks(COLUMNS.length)})`).join(',')}`;
    if (insertSqlBySize.size < 64) insertSqlBySize.set(n, text);
  }
  return text;
}

/**
 * Runs an encoded replace in one transaction: the spans' old rows are deleted (spans asked for but absent from the
 * rows are left without any), then the rows are inserted with multi-row prepared statements.
 */
export async function writeAssessmentRows(em: EntityManager, write: AssessmentWrite): Promise<void> {
  const { pg, spanIds, inserts } = write;
  await inTransaction(em, async (run) => {
    // Writers of the same spans' rows (a request, a background rescore, another process) take turns on PostgreSQL;
    // on SQLite the one connection already serialises them.
    if (pg) await run('select pg_advisory_xact_lock(hashtext(?))', ['assessments']);
    // The transaction holds the connection, so the counter moves only by this writer's rows.
    const before = pg ? 0 : await changeCounter(run);
    for (let i = 0; i < spanIds.length; i += DELETE_CHUNK) {
      const ids = spanIds.slice(i, i + DELETE_CHUNK);
      await run(`delete from "assessments" where "span_id" in (${marks(ids.length)})`, ids as unknown[]);
    }
    for (const ins of inserts) await run(ins.sql, ins.params);
    if (!pg) noteAssessmentOnlyChanges(em, (await changeCounter(run)) - before);
  });
}

/** Replaces the stored rows of the given spans with `rows` in one transaction (encodeAssessmentWrite + writeAssessmentRows). */
export async function replaceAssessmentRows(em: EntityManager, spanIds: readonly string[], rows: readonly Partial<Assessment>[]): Promise<void> {
  await writeAssessmentRows(em, encodeAssessmentWrite(em, spanIds, rows));
}

/** Rows of spans that were deleted meanwhile. */
export async function deleteOrphanAssessments(em: EntityManager): Promise<void> {
  const pg = isPostgres(em);
  await inTransaction(em, async (run) => {
    const before = pg ? 0 : await changeCounter(run);
    await run('delete from assessments where span_id not in (select id from spans)', []);
    if (!pg) noteAssessmentOnlyChanges(em, (await changeCounter(run)) - before);
  });
}

/** Which pairs of the given spans are stored and whether each perches (no JSON read), in the stored order. */
export async function readPerchFlags(
  em: EntityManager,
  spanIds: readonly string[],
  only: { harvesterIds: readonly string[]; droneIds: readonly string[] },
): Promise<{ spanId: string; perchable: boolean }[]> {
  const out: { spanId: string; perchable: boolean }[] = [];
  const { harvesterIds: h, droneIds: d } = only;
  if (!spanIds.length || !h.length || !d.length) return out;
  for (let i = 0; i < spanIds.length; i += DELETE_CHUNK) {
    const ids = spanIds.slice(i, i + DELETE_CHUNK);
    const rows = await sql.all<{ span_id: string; perchable: unknown }>(
      em,
      `select span_id, perchable from assessments where span_id in (${marks(ids.length)}) and harvester_profile_id in (${marks(h.length)}) and drone_profile_id in (${marks(d.length)}) order by id`,
      [...ids, ...h, ...d],
    );
    for (const r of rows) out.push({ spanId: r.span_id, perchable: !!r.perchable });
  }
  return out;
}

/** The stored columns a view reads (of the inputs only their load source), decoded to the entity's types; no identity map. */
export type AssessmentSummaryRow = Omit<Assessment, 'id' | 'inputs'> & { inputs: { loadSource?: unknown } };

/**
 * Stored rows of the given spans without their inputs (the largest column), for read-only views: span lists,
 * perch standings. Optionally only the given harvesters and drones.
 */
export async function readAssessmentSummaries(
  em: EntityManager,
  spanIds: readonly string[],
  only: { harvesterIds?: readonly string[]; droneIds?: readonly string[] } = {},
): Promise<AssessmentSummaryRow[]> {
  const out: AssessmentSummaryRow[] = [];
  const h = only.harvesterIds;
  const d = only.droneIds;
  if (!spanIds.length || (h && !h.length) || (d && !d.length)) return out;
  for (let i = 0; i < spanIds.length; i += DELETE_CHUNK) {
    const ids = spanIds.slice(i, i + DELETE_CHUNK);
    const rows = await sql.all<Record<string, any>>(
      em,
      'select span_id, harvester_profile_id, drone_profile_id, perchable, score, harvest_w, charge_time_min, conductor_temp_c, ampacity_a, result, ' +
        `method_version, settings_version, harvester_version, drone_version, computed_at, ${jsonTextField(em, 'inputs', 'loadSource')} as load_source from assessments ` +
        `where span_id in (${marks(ids.length)})` +
        (h ? ` and harvester_profile_id in (${marks(h.length)})` : '') +
        (d ? ` and drone_profile_id in (${marks(d.length)})` : '') +
        ' order by id',
      [...ids, ...(h ?? []), ...(d ?? [])],
    );
    for (const r of rows) {
      out.push({
        spanId: r.span_id,
        harvesterProfileId: r.harvester_profile_id,
        droneProfileId: r.drone_profile_id,
        perchable: !!r.perchable,
        score: r.score,
        harvestW: r.harvest_w,
        chargeTimeMin: r.charge_time_min,
        conductorTempC: r.conductor_temp_c,
        ampacityA: r.ampacity_a,
        result: readStoredResult(r.result),
        methodVersion: r.method_version,
        settingsVersion: r.settings_version,
        harvesterVersion: r.harvester_version,
        droneVersion: r.drone_version,
        inputs: r.load_source === null || r.load_source === undefined ? {} : { loadSource: r.load_source },
        computedAt: new Date(typeof r.computed_at === 'string' && !/^\d+$/.test(r.computed_at) ? r.computed_at : Number(r.computed_at)),
      });
    }
  }
  return out;
}
