// The bulk rescoring path (memoised method, prepared multi-row writes) against the per-span path on the same data:
// the stored assessments must be identical, row for row and byte for byte.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { MikroORM } from '@mikro-orm/sqlite';
import { initORM } from '../../server/db.ts';
import { seedDemoUsers } from '../../server/seeders/demo-users.ts';
import { seedScaleInventory } from '../../server/seeders/scale-inventory.ts';
import { ensureAssessmentDefaults } from '../../server/modules/assessment/profiles.service.ts';
import { assessSpans, assessSpansBulk, registerAssessedListener } from '../../server/modules/assessment/assessment.service.ts';
import { Zone } from '../../server/modules/zones/zone.entity.ts';
import { User } from '../../server/modules/auth/user.entity.ts';
import { assessSpan, createAssessmentMemo, DEFAULT_DESIGN_WEATHER, DEFAULT_SCORING_SETTINGS, type SpanAssessmentInput } from '../../shared/engineering/assessment.ts';
import { ACSR_CONDUCTORS, thermalConductorOf } from '../../shared/engineering/conductors.ts';
import { CLAMP_S, LIGHT_QUAD } from '../../shared/engineering/demo-profiles.ts';
import { Assessment } from '../../server/modules/assessment/assessment.entity.ts';
import { decodeResult, encodeResult, readStoredResult } from '../../server/modules/assessment/result-codec.ts';

const NOW = new Date('2026-07-01T12:00:00Z');
let orm: MikroORM;

/** Every stored column but the row id, in a fixed order. */
async function stored(): Promise<Record<string, unknown>[]> {
  const rows = await orm.em.fork().getConnection().execute<Record<string, unknown>[]>('select * from assessments order by span_id, harvester_profile_id, drone_profile_id');
  return rows.map(({ id: _id, ...rest }) => rest);
}

beforeAll(async () => {
  orm = await initORM(':memory:');
  const em = orm.em.fork();
  await seedDemoUsers(em);
  await ensureAssessmentDefaults(em);
  const surveyor = await em.findOneOrFail(User, { email: 'surveyor@roostline.test' });
  const { bbox } = await seedScaleInventory(orm.em.fork(), { spans: 800, seed: 7, surveyorIds: [surveyor.id] });
  // One exclude and one caution zone over parts of the network, so zone gates and penalties are exercised.
  const box = (x0: number, y0: number, x1: number, y1: number) => ({ type: 'Polygon' as const, coordinates: [[[x0, y0], [x1, y0], [x1, y1], [x0, y1], [x0, y0]]] });
  const midX = (bbox.west + bbox.east) / 2;
  const midY = (bbox.south + bbox.north) / 2;
  em.create(Zone, { id: 'z-exclude', name: 'Substation yard', reason: 'fenced yard', severity: 'exclude', geometry: box(bbox.west, bbox.south, midX, midY), createdById: surveyor.id, version: 1, createdAt: NOW, updatedAt: NOW });
  em.create(Zone, { id: 'z-caution', name: 'School grounds', reason: 'people below', severity: 'caution', geometry: box(midX - 0.05, midY - 0.05, bbox.east, bbox.north), createdById: surveyor.id, version: 1, createdAt: NOW, updatedAt: NOW });
  await em.flush();
}, 120_000);
afterAll(async () => orm?.close());

describe('bulk rescoring', () => {
  it('when every span is rescored on the bulk path, then the stored rows equal the per-span path exactly', async () => {
    await assessSpans(orm.em.fork(), undefined, { now: NOW, clearBetweenBatches: true });
    const plain = await stored();
    expect(plain.length).toBeGreaterThan(800); // every span × every active pair
    expect(new Set(plain.map((r) => r.perchable)).size).toBe(2); // both outcomes present in the sample
    await orm.em.fork().getConnection().execute('delete from assessments');
    let progressed = 0;
    const n = await assessSpansBulk(orm.em.fork(), undefined, { now: NOW, clearBetweenBatches: true, onBatch: (k) => (progressed += k) });
    expect(n).toBe(800);
    expect(progressed).toBe(800); // the job's progress bar reaches its total
    const fast = await stored();
    expect(fast).toEqual(plain);
    expect(JSON.stringify(fast)).toBe(JSON.stringify(plain));
  }, 180_000);

  it('when a random sample of spans (and one that no longer exists) is rescored on both paths, then they agree and the missing span has no rows', async () => {
    const ids = (await orm.em.fork().getConnection().execute<{ id: string }[]>('select id from spans order by random() limit 150')).map((r) => r.id);
    const asked = [...ids, 'sp-gone'];
    await orm.em.fork().getConnection().execute("insert into assessments (span_id, harvester_profile_id, drone_profile_id, perchable, score, harvest_w, conductor_temp_c, ampacity_a, result, inputs, method_version, settings_version, harvester_version, drone_version, computed_at) values ('sp-gone', 'h', 'd', 0, 0, 0, 0, 0, '{}', '{}', 'm', 1, 1, 1, 0)");
    const later = new Date(NOW.getTime() + 86_400_000);
    await assessSpans(orm.em.fork(), asked, { now: later });
    const plain = await stored();
    await assessSpansBulk(orm.em.fork(), asked, { now: new Date(NOW.getTime() - 1) });
    await assessSpansBulk(orm.em.fork(), asked, { now: later });
    expect(await stored()).toEqual(plain);
    expect(plain.some((r) => r.span_id === 'sp-gone')).toBe(false);
  }, 120_000);

  it('when a run is stopped after its first batch while the next batch is already read and computed, then only the first batch is stored, and each listener sees its own batch committed and no later one', async () => {
    const conn = () => orm.em.fork().getConnection();
    await conn().execute('delete from assessments');
    const seen: { ids: string[]; storedSpans: string[]; rowsPerSpan: number[] }[] = [];
    const off = registerAssessedListener(async (_em, spanIds) => {
      const rows = await conn().execute<{ span_id: string; n: number }[]>('select span_id, count(*) as n from assessments group by span_id order by span_id');
      seen.push({ ids: [...spanIds].sort(), storedSpans: rows.map((r) => r.span_id), rowsPerSpan: [...new Set(rows.map((r) => Number(r.n)))] });
    });
    try {
      let progressed = 0;
      const n = await assessSpansBulk(orm.em.fork(), undefined, { now: NOW, clearBetweenBatches: true, onBatch: (k) => (progressed += k), shouldStop: () => seen.length >= 1 });
      expect(seen).toHaveLength(1);
      expect(seen[0].ids).toHaveLength(500);
      expect(n).toBe(500);
      expect(progressed).toBe(500);
      // When the listener ran, exactly its batch was stored, every span with one row per active pair.
      expect(seen[0].storedSpans).toEqual(seen[0].ids);
      expect(seen[0].rowsPerSpan).toHaveLength(1);
      // The next batch, built while the first was written, was never written.
      const after = await stored();
      expect([...new Set(after.map((r) => r.span_id as string))].sort()).toEqual(seen[0].ids);

      // A full run: every listener call sees its own batch and those before it, never a later one.
      await conn().execute('delete from assessments');
      seen.length = 0;
      expect(await assessSpansBulk(orm.em.fork(), undefined, { now: NOW })).toBe(800);
      expect(seen.map((s) => s.ids.length)).toEqual([500, 300]);
      expect(seen[1].storedSpans).toEqual([...seen[0].ids, ...seen[1].ids].sort());
    } finally {
      off();
    }
  }, 120_000);

  it('when a request edits a span of the next batch after that batch was read, then its stored rows come from the edited record, not the one the batch read', async () => {
    const conn = () => orm.em.fork().getConnection();
    await conn().execute('delete from assessments');
    const ids = (await conn().execute<{ id: string }[]>('select id from spans order by id')).map((r) => r.id);
    const target = ids[650]; // in the second batch of 500
    const [before] = await conn().execute<{ clearance_m: number | null; version: number }[]>('select clearance_m, version from spans where id = ?', [target]);
    let edited = false;
    // The first batch's listener runs after the second batch was read and computed: an edit made then is one the
    // second batch's rows do not know.
    const off = registerAssessedListener(async () => {
      if (edited) return;
      edited = true;
      await conn().execute('update spans set clearance_m = ?, version = version + 1 where id = ?', [0.5, target]);
    });
    try {
      expect(await assessSpansBulk(orm.em.fork(), undefined, { now: NOW })).toBe(800);
      expect(edited).toBe(true);
      const rowsOf = async () => (await stored()).filter((r) => r.span_id === target);
      const bulk = await rowsOf();
      expect(bulk.length).toBeGreaterThan(0);
      // 0.5 m is below the code ground clearance at any voltage (NESC Table 232-1 as coded in shared/engineering/clearance.ts: 18.5 ft ≈ 5.64 m at the least), so no pair perches.
      expect(bulk.every((r) => !r.perchable)).toBe(true);
      expect(bulk.every((r) => JSON.parse(String(r.inputs)).span.clearanceM === 0.5)).toBe(true);
      // The same rows as the per-span path gives from the edited record.
      await assessSpans(orm.em.fork(), [target], { now: NOW });
      expect(await rowsOf()).toEqual(bulk);
    } finally {
      off();
      await conn().execute('update spans set clearance_m = ?, version = ? where id = ?', [before.clearance_m, before.version, target]);
    }
  }, 120_000);
});

describe('assessment memo', () => {
  it('when 3 000 random spans are assessed with and without the memo, then every result is identical', () => {
    let seed = 3;
    const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    const memo = createAssessmentMemo();
    for (let i = 0; i < 3000; i++) {
      const c = thermalConductorOf(ACSR_CONDUCTORS[Math.floor(rand() * ACSR_CONDUCTORS.length)]);
      // Few distinct loads, so the memo is hit often, plus some with bundles and local weather.
      const typical = 100 + 50 * Math.floor(rand() * 12);
      const input: SpanAssessmentInput = {
        conductor: { ...c, subConductors: rand() < 0.1 ? 2 : undefined },
        clearanceM: rand() < 0.1 ? null : 4 + rand() * 10,
        loadCurrentA: { min: typical * 0.5, typical, peak: typical * 1.4 },
        voltageKv: [12.47, 34.5, 69, 138][Math.floor(rand() * 4)],
        frequencyHz: rand() < 0.2 ? 50 : 60,
        lengthM: 50 + rand() * 500,
        hazards: rand() < 0.2 ? [{ severity: 'high' }] : [],
        completeness: { a: true, b: rand() < 0.5 },
        surveyAgeDays: Math.floor(rand() * 2000),
        zones: { inExclude: rand() < 0.05, inCautionCount: rand() < 0.1 ? 1 : 0 },
        weather: rand() < 0.1 ? { ambientC: 25 } : undefined,
      };
      const settings = rand() < 0.2 ? { ...DEFAULT_SCORING_SETTINGS, ampacityMaxConductorC: 75 } : DEFAULT_SCORING_SETTINGS;
      expect(assessSpan(input, CLAMP_S, LIGHT_QUAD, DEFAULT_DESIGN_WEATHER, settings, memo)).toEqual(assessSpan(input, CLAMP_S, LIGHT_QUAD, DEFAULT_DESIGN_WEATHER, settings));
    }
    expect(memo.thermal.size).toBeLessThan(3000 * 2); // repeats were served from the memo
  }, 60_000);
});

describe('stored result form', () => {
  it('when 3 000 random results are put in their stored form and read back, then each is the same object with the same keys in the same order', () => {
    let seed = 5;
    const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    let before = 0;
    let after = 0;
    for (let i = 0; i < 3000; i++) {
      const c = thermalConductorOf(ACSR_CONDUCTORS[Math.floor(rand() * ACSR_CONDUCTORS.length)]);
      const typical = rand() < 0.05 ? 0 : 20 + rand() * 1200;
      const result = assessSpan(
        {
          conductor: c,
          clearanceM: rand() < 0.1 ? null : 2 + rand() * 14,
          loadCurrentA: { min: typical * 0.4, typical, peak: typical * 1.5 },
          voltageKv: [12.47, 34.5, 69, 138, 230][Math.floor(rand() * 5)],
          frequencyHz: rand() < 0.2 ? 50 : 60,
          lengthM: 30 + rand() * 700,
          hazards: rand() < 0.3 ? [{ severity: rand() < 0.5 ? 'high' : 'low' }] : [],
          completeness: { a: true, b: rand() < 0.5 },
          surveyAgeDays: rand() < 0.1 ? null : Math.floor(rand() * 4000),
          zones: { inExclude: rand() < 0.1, inCautionCount: rand() < 0.2 ? 2 : 0 },
        },
        CLAMP_S,
        LIGHT_QUAD,
        DEFAULT_DESIGN_WEATHER,
        DEFAULT_SCORING_SETTINGS,
      );
      // What the stored JSON gives back without the compact form is the reference (JSON drops non-finite numbers).
      const plain = JSON.stringify(result);
      const stored = JSON.stringify(encodeResult(JSON.parse(plain)));
      expect(JSON.stringify(decodeResult(JSON.parse(stored)))).toBe(plain);
      before += plain.length;
      after += stored.length;
    }
    expect(after).toBeLessThan(before * 0.7); // the point of the form: far fewer bytes per stored row
  });

  it('when rows are read through the entity and through hand-written SQL, then both give the decoded result; a result stored in the earlier form reads as it is', async () => {
    const em = orm.em.fork();
    const raw = await em.getConnection().execute<{ id: number; result: string }[]>('select id, result from assessments order by random() limit 100');
    expect(raw.every((r) => r.result.includes('"~c":1'))).toBe(true); // written in the compact form
    const rows = await em.find(Assessment, { id: { $in: raw.map((r) => r.id) } });
    for (const row of rows) {
      const text = raw.find((r) => r.id === row.id)!.result;
      expect(row.result).toEqual(readStoredResult(text));
      const gates = (row.result as { gates: { detail: string; parts: unknown[] }[] }).gates;
      expect(gates.length).toBeGreaterThan(0);
      for (const g of gates) expect(typeof g.detail).toBe('string');
    }
    const earlier = { perchable: false, score: 1, gates: [{ id: 'clearance', passed: false, blocking: true, detail: 'clearance 4.00 m' }], factors: [] };
    await em.getConnection().execute('update assessments set result = ? where id = ?', [JSON.stringify(earlier), raw[0].id]);
    expect((await orm.em.fork().findOneOrFail(Assessment, { id: raw[0].id })).result).toEqual(earlier);
  });
});
