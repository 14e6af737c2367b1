// Full-detail span tiles made by PostGIS (ST_AsMVT over the spans' and structures' GiST indexes), for the zooms
// where every span is its own feature. Same layers, features and tags as the in-memory builder in span-tiles.ts:
// a span is in a tile when its box meets the tile and its buffer; lengths, scores and harvest rounded alike; no
// clipping (the in-memory builder does not clip either). Lower zooms stay with that builder (their generalisation).
import type { EntityManager } from '@mikro-orm/core';
import { sql } from '../../sql/query.ts';

export interface PostgisTileParams {
  z: number;
  x: number;
  y: number;
  extent: number;
  buffer: number;
  /** The pair whose assessment the tags carry; null = none (tags without score, harvest, perchable). */
  pair: { harvesterProfileId: string; droneProfileId: string } | null;
  filters: { status?: string; lineId?: string; minHarvestW?: number; minScore?: number };
  withStructures: boolean;
}

/** The MVT bytes of one tile (layers `spans` and, when asked, `structures`). */
export async function postgisSpanTile(em: EntityManager, p: PostgisTileParams): Promise<Buffer> {
  const params: unknown[] = [p.z, p.x, p.y, p.z, p.x, p.y, p.buffer / p.extent];
  const assessed = p.pair !== null;
  const where: string[] = ['s.geom && env.box'];
  if (assessed) params.push(p.pair!.harvesterProfileId, p.pair!.droneProfileId);
  if (p.filters.status) (where.push('s.status = ?'), params.push(p.filters.status));
  if (p.filters.lineId) (where.push('s.line_id = ?'), params.push(p.filters.lineId));
  // A filter on a figure leaves out spans without an assessment (as the in-memory filter does).
  const figures = p.filters.minHarvestW !== undefined || p.filters.minScore !== undefined;
  if (figures && !assessed) where.push('false');
  if (assessed && p.filters.minHarvestW !== undefined) (where.push('x.harvest_w >= ?'), params.push(p.filters.minHarvestW));
  if (assessed && p.filters.minScore !== undefined) (where.push('x.score >= ?'), params.push(p.filters.minScore));
  const mvtGeom = `ST_AsMVTGeom(ST_Transform(GEOM, 3857), env.tile, ${Number(p.extent)}, ${Number(p.buffer)}, false)`;
  const spans =
    // Rounded as JavaScript's Math.round(v * k) / k is: floor(v * k + 0.5) / k, in the same double arithmetic.
    'select s.id, s.line_id as "lineId", s.status, floor(s.length_m * 10 + 0.5) / 10 as "lengthM"' +
    (assessed ? ', floor(x.score * 10 + 0.5) / 10 as score, floor(x.harvest_w * 100 + 0.5) / 100 as "harvestW", x.perchable as perchable' : '') +
    `, ${mvtGeom.replace('GEOM', 's.geom')} as geom from spans s cross join env` +
    (assessed ? ' left join assessments x on x.span_id = s.id and x.harvester_profile_id = ? and x.drone_profile_id = ?' : '') +
    ` where ${where.join(' and ')}`;
  const structures = `select t.id, t.line_id as "lineId", t.kind, t.label, ${mvtGeom.replace('GEOM', 't.geom')} as geom from structures t cross join env where t.geom && env.box`;
  const text =
    'with env as (select ST_TileEnvelope(?, ?, ?) as tile, ST_Transform(ST_TileEnvelope(?, ?, ?, margin => ?::float8), 4326) as box), ' +
    `sp as (${spans})` +
    (p.withStructures ? `, st as (${structures})` : '') +
    ` select coalesce((select ST_AsMVT(sp, 'spans', ${Number(p.extent)}, 'geom') from sp where sp.geom is not null), ''::bytea)` +
    (p.withStructures ? ` || coalesce((select ST_AsMVT(st, 'structures', ${Number(p.extent)}, 'geom') from st where st.geom is not null), ''::bytea)` : '') +
    ' as tile';
  const row = await sql.get<{ tile: Buffer | null }>(em, text, params);
  return row?.tile ? Buffer.from(row.tile) : Buffer.alloc(0);
}
