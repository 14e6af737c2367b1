import { describe, expect, it } from 'vitest';
import { thinPerches } from '../../server/modules/missions/plan.service.ts';

// The planner thins a dense network to the best-harvesting span per grid cell before the route search.
const row = (id: string, lat: number, lon: number, harvest: number) => ({ id, lat, lon, harvest_w: harvest });
// A square of 0.1° (about 11.1 × 11.1 km at the equator) starting at 0, 0.
const AREA_M2 = (0.1 * 111_320) ** 2;

describe('thinning perches near the route', () => {
  it('when there are no more perches than the limit, then every one is kept', () => {
    const rows = [row('a', 0.01, 0.01, 20), row('b', 0.0101, 0.0101, 30)];
    expect(thinPerches(rows, AREA_M2, 10)).toEqual(rows);
  });

  it('when there are more, then each grid cell keeps its highest harvest, and no kept perch shares a cell', () => {
    // 4 cells of ~5.6 km: 400 rows spread over the box, harvest rising with the index.
    const rows = Array.from({ length: 400 }, (_, i) => row(`s${String(i).padStart(3, '0')}`, ((i * 37) % 100) / 1000, ((i * 53) % 100) / 1000, i));
    const kept = thinPerches(rows, AREA_M2, 4);
    expect(kept.length).toBeLessThanOrEqual(4);
    expect(kept.length).toBeGreaterThan(0);
    const cell = (r: { lat: number; lon: number }) => `${Math.floor(r.lat / 0.05)}:${Math.floor(r.lon / 0.05)}`;
    for (const k of kept) {
      const rivals = rows.filter((r) => cell(r) === cell(k));
      expect(k.harvest_w).toBe(Math.max(...rivals.map((r) => r.harvest_w)));
    }
    expect(new Set(kept.map(cell)).size).toBe(kept.length);
  });
});
