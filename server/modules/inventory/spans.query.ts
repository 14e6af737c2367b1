// GET /api/spans: server-side filtering, sorting and pagination in one SQL query.
// The stored assessment of the default pair (first active harvester × drone) is joined, so harvest power
// and score can filter and sort; a span without one has no harvest figure and meets no minimum.
import type { EntityManager } from '@mikro-orm/core';
import type { Page, Span as SpanView, SpanListQuery, SpanSortKey } from '#shared/schemas/inventory.ts';
import { Span } from './span.entity.ts';
import { perchableSql } from '../assessment/perchable.ts';
import { spanViews } from './inventory.service.ts';
import { defaultPairOf, readActiveProfiles } from '../assessment/profiles.service.ts';
import { sql as bound } from '../../sql/query.ts';
import { dataVersion, type VersionScope } from '../../sql/data-version.ts';
import { isPostgres } from '../../sql/dialect.ts';

export interface SpanFilter {
  status?: string[];
  lineId?: string;
  surveyorId?: string;
  q?: string;
  minHarvestW?: number;
  minScore?: number;
  perchable?: boolean;
  sort?: string;
  page: number;
  pageSize: number;
}

const STATUS_ORDER = "case s.status when 'returned' then 0 when 'draft' then 1 when 'submitted' then 2 when 'approved' then 3 when 'suspended' then 4 else 5 end";

const SORT_SQL: Record<SpanSortKey, string> = {
  lengthM: 's.length_m',
  updatedAt: 's.updated_at',
  createdAt: 's.created_at',
  status: STATUS_ORDER,
  clearanceM: 's.clearance_m',
  loadCurrentA: 'coalesce(s.load_current_a, l.load_typical_a)',
  surveyDate: 's.survey_date',
  harvestW: 'a.harvest_w',
  score: 'a.score',
  line: 'l.name',
};

function likeEscape(q: string) {
  return `%${q.toLowerCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/** The default pair's ids (read once per request), or null when there is none. */
type Pair = { harvesterProfileId: string; droneProfileId: string } | null;

/**
 * Builds the FROM/WHERE part shared by the page and the count. `forCount` leaves out the joins that cannot change
 * the number of rows: structures and the default pair's assessment are left joins on a unique key (at most one
 * row each), and every span has its line (foreign key); they are joined only when a filter reads them.
 */
function buildQuery(pair: Pair, f: SpanFilter, forCount = false, extra?: { sql: string; params: unknown[] }) {
  const params: unknown[] = [];
  const needsLabels = !forCount || !!f.q;
  const needsAssessment = !forCount || f.minHarvestW !== undefined || f.minScore !== undefined;
  let from = needsLabels
    ? 'from spans s join lines l on l.id = s.line_id ' +
      'left join structures fs on fs.id = s.from_structure_id ' +
      'left join structures ts on ts.id = s.to_structure_id '
    : 'from spans s ';
  const hasAssessment = !!pair;
  if (hasAssessment && needsAssessment) {
    from += 'left join assessments a on a.span_id = s.id and a.harvester_profile_id = ? and a.drone_profile_id = ? ';
    params.push(pair!.harvesterProfileId, pair!.droneProfileId);
  }
  const where: string[] = [];
  if (f.status?.length) {
    where.push(`s.status in (${f.status.map(() => '?').join(',')})`);
    params.push(...f.status);
  }
  if (f.lineId) {
    where.push('s.line_id = ?');
    params.push(f.lineId);
  }
  if (f.surveyorId) {
    where.push('s.surveyor_id = ?');
    params.push(f.surveyorId);
  }
  if (f.q) {
    const like = likeEscape(f.q);
    // lower() on both sides: SQLite's LIKE ignores ASCII case, PostgreSQL's does not.
    where.push(
      "(lower(fs.label) like ? escape '\\' or lower(ts.label) like ? escape '\\' or lower(l.name) like ? escape '\\' or lower(s.conductor_code_word) like ? escape '\\' or s.id = ?)",
    );
    params.push(like, like, like, like, f.q);
  }
  if (f.perchable !== undefined) where.push(f.perchable ? perchableSql('s') : `not ${perchableSql('s')}`);
  // Without a stored assessment a span has no harvest figure, so it cannot meet a minimum.
  if (f.minHarvestW !== undefined) {
    if (hasAssessment) {
      where.push('a.harvest_w >= ?');
      params.push(f.minHarvestW);
    } else where.push('0 = 1');
  }
  if (f.minScore !== undefined) {
    if (hasAssessment) {
      where.push('a.score >= ?');
      params.push(f.minScore);
    } else where.push('0 = 1');
  }
  if (extra) {
    where.push(extra.sql);
    params.push(...extra.params);
  }
  // Totals that read assessments change with every rescore; the others only with the inventory.
  const scope: VersionScope = needsAssessment && hasAssessment ? 'all' : f.perchable !== undefined ? 'all' : 'inventory';
  return { sql: from + (where.length ? `where ${where.join(' and ')} ` : ''), params, hasAssessment, scope };
}

/** Sort columns that are never null: their order needs no "nulls last" term, so an index can serve it. */
const NOT_NULL_SORTS = new Set<SpanSortKey>(['lengthM', 'updatedAt', 'createdAt', 'status', 'line']);

function orderBy(sort: string | undefined, hasAssessment: boolean) {
  const desc = !!sort?.startsWith('-');
  const key = (sort?.replace(/^-/, '') || 'updatedAt') as SpanSortKey;
  let expr = SORT_SQL[key] ?? SORT_SQL.updatedAt;
  if (!hasAssessment && (key === 'harvestW' || key === 'score')) expr = 'null';
  const dir = desc || (!sort && key === 'updatedAt') ? 'desc' : 'asc';
  const tail = key === 'line' ? `, fs.label ${dir}, s.id` : ', l.name, fs.label, s.id';
  if (NOT_NULL_SORTS.has(key) && SORT_SQL[key] === expr) return `order by ${expr} ${dir}${tail}`;
  return `order by ${expr} is null, ${expr} ${dir}${tail}`;
}

/** Exact totals per filter, kept while the data version they were counted at is current (bounded, least recent out). */
const MAX_TOTALS = 500;
const totals = new WeakMap<object, Map<string, number>>();

async function totalOf(em: EntityManager, pair: Pair, f: SpanFilter): Promise<number> {
  const { sql, params, scope } = buildQuery(pair, f, true);
  const conn = em.getConnection();
  let cache = totals.get(conn);
  if (!cache) totals.set(conn, (cache = new Map()));
  // The version is read before counting: a write in between makes the next request miss, never serve an old total.
  const key = `${await dataVersion(em, scope)}\u0000${sql}\u0000${JSON.stringify(params)}`;
  const hit = cache.get(key);
  if (hit !== undefined) {
    cache.delete(key);
    cache.set(key, hit);
    return hit;
  }
  const [{ n }] = await bound.all<{ n: number }>(em, `select count(*) as n ${sql}`, params);
  if (cache.size >= MAX_TOTALS) cache.delete(cache.keys().next().value!);
  cache.set(key, Number(n));
  return Number(n);
}

/** Sorts on a never-null column of spans alone: their pages are found on the column's index first (keyset). */
const KEYSET_SORTS: Partial<Record<SpanSortKey, string>> = { updatedAt: 's.updated_at', createdAt: 's.created_at', lengthM: 's.length_m' };

/**
 * The page's span ids in the full order. For a sort on a spans column, the page's first and last sort values are
 * read from spans alone (the count's joins only), then only the rows between them are joined and ordered in full:
 * rows skipped over on deep pages are never joined. Same rows in the same order as the plain query (tested).
 */
async function pageIds(em: EntityManager, pair: Pair, f: SpanFilter): Promise<string[]> {
  const offset = (f.page - 1) * f.pageSize;
  const key = (f.sort?.replace(/^-/, '') || 'updatedAt') as SpanSortKey;
  const col = KEYSET_SORTS[key];
  const base = buildQuery(pair, f);
  // On PostgreSQL a timestamp read back into JavaScript keeps milliseconds only, so date bounds could drop a row: plain query there.
  if (!col || f.q || (isPostgres(em) && key !== 'lengthM')) {
    const rows = await bound.all<{ id: string }>(em, `select s.id as id ${base.sql}${orderBy(f.sort, base.hasAssessment)} limit ? offset ?`, [...base.params, f.pageSize, offset]);
    return rows.map((r) => r.id);
  }
  const desc = !!f.sort?.startsWith('-') || !f.sort;
  const lean = buildQuery(pair, f, true);
  const keys = await bound.all<{ k: unknown }>(em, `select ${col} as k ${lean.sql}order by ${col} ${desc ? 'desc' : 'asc'} limit ? offset ?`, [...lean.params, f.pageSize, offset]);
  if (!keys.length) return [];
  const first = keys[0].k;
  const last = keys[keys.length - 1].k;
  // Rows ahead of the page's first value come before it in the full order; the page starts that many rows into the range.
  const ahead = buildQuery(pair, f, true, { sql: `${col} ${desc ? '>' : '<'} ?`, params: [first] });
  const [{ n }] = await bound.all<{ n: number }>(em, `select count(*) as n ${ahead.sql}`, ahead.params);
  const range = buildQuery(pair, f, false, { sql: `${col} between ? and ?`, params: desc ? [last, first] : [first, last] });
  const rows = await bound.all<{ id: string }>(em, `select s.id as id ${range.sql}${orderBy(f.sort, range.hasAssessment)} limit ? offset ?`, [...range.params, f.pageSize, offset - Number(n)]);
  return rows.map((r) => r.id);
}

export async function listSpans(em: EntityManager, f: SpanFilter): Promise<Page<SpanView>> {
  // The active profiles (the default pair for the joins and views, every pair for the standings): read once.
  const profiles = await readActiveProfiles(em);
  const pair = defaultPairOf(profiles);
  const n = await totalOf(em, pair, f);
  const ids = await pageIds(em, pair, f);
  const spans = ids.length ? await em.find(Span, { id: { $in: ids } }) : [];
  const byId = new Map(spans.map((s) => [s.id, s]));
  const items = await spanViews(
    em,
    ids.map((id) => byId.get(id)!).filter(Boolean),
    profiles,
  );
  return { items, total: Number(n), page: f.page, pageSize: f.pageSize };
}

/** The list page as sent: the JSON as UTF-8 bytes and its ETag (null when the app sends none). */
export interface ListBody {
  body: Buffer;
  etag: string | null;
}

/** Serialised pages per filter, kept while the data version they were read at is current (bounded by size, least recent out). */
const MAX_PAGE_BYTES = 32 * 1024 * 1024;
const pages = new WeakMap<object, { bytes: number; bodies: Map<string, ListBody> }>();

/**
 * The list page as the JSON the API sends. Ten planners paging the same filter (or one paging back) are answered
 * from the body read at the current data version; any write anywhere (a span, a photo, a rescore batch, a profile)
 * moves the version, so a page is never older than the data. The body is kept as bytes with its ETag (`etagOf`,
 * the app's own ETag function), so a page served again is neither encoded nor hashed again.
 */
export async function listSpansJson(em: EntityManager, f: SpanFilter, etagOf?: (body: Buffer) => string | undefined): Promise<ListBody> {
  const conn = em.getConnection();
  let cache = pages.get(conn);
  if (!cache) pages.set(conn, (cache = { bytes: 0, bodies: new Map() }));
  // Read before the page: a write in between makes the next request miss, never serve an old page.
  const key = `${await dataVersion(em, 'all')}\u0000${etagOf ? 'e' : '-'}${JSON.stringify(f)}`;
  const hit = cache.bodies.get(key);
  if (hit !== undefined) {
    cache.bodies.delete(key);
    cache.bodies.set(key, hit);
    return hit;
  }
  const body = Buffer.from(JSON.stringify(await listSpans(em, f)), 'utf8');
  const page: ListBody = { body, etag: etagOf?.(body) ?? null };
  if (body.length <= MAX_PAGE_BYTES / 8) {
    while (cache.bytes + body.length > MAX_PAGE_BYTES && cache.bodies.size) {
      const [oldest, old] = cache.bodies.entries().next().value!;
      cache.bodies.delete(oldest);
      cache.bytes -= old.body.length;
    }
    cache.bodies.set(key, page);
    cache.bytes += body.length;
  }
  return page;
}

/** Every span id matching the filter in the table order (exports): no pagination. */
export async function matchingSpanIds(em: EntityManager, f: Omit<SpanFilter, 'page' | 'pageSize'>): Promise<string[]> {
  const { sql, params, hasAssessment } = buildQuery(defaultPairOf(await readActiveProfiles(em)), { ...f, page: 1, pageSize: 1 });
  const sort = f.sort ?? 'line';
  const rows = await bound.all<{ id: string }>(em, `select s.id as id ${sql}${orderBy(sort, hasAssessment)}`, params);
  return rows.map((r) => r.id);
}

export type { SpanListQuery };
