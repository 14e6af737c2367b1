// Pure transforms of the plan screen: charge over time, departure with the browser's offset, route order, words.
import { describe, expect, it } from 'vitest';
import {
  chargeSeries,
  formatCourse,
  formatDistance,
  formatDuration,
  infeasibleText,
  localInputToIso,
  offsetOf,
  routeStops,
  svgRoute,
  wallClock,
} from '../../src/features/missions/transforms.ts';
import type { FeasiblePlan, PlanLeg, PlanPerch } from '../../src/features/missions/types.ts';

const leg = (o: Partial<PlanLeg>): PlanLeg => ({ distanceM: 1000, courseDeg: 90, groundSpeedMps: 12, durationS: 600, energyWh: 50, socStartPct: 100, socEndPct: 50, ...o });
const perch = (o: Partial<PlanPerch>): PlanPerch => ({
  spanId: 's1', lineId: 'l1', arriveAt: '2026-06-01T09:10:00+02:00', departAt: '2026-06-01T10:10:00+02:00', dwellS: 3600, harvestW: 60,
  socArrivePct: 50, socDepartPct: 100, lineBearingDeg: 45, conductorHeightM: 12, ...o,
});

describe('chargeSeries', () => {
  it('when a plan has two perches, then charge falls along each leg and climbs over each dwell, in minutes since departure', () => {
    const plan = {
      legs: [leg({ toSpanId: 'a', durationS: 600, socEndPct: 40 }), leg({ toSpanId: 'b', durationS: 900, socStartPct: 100, socEndPct: 30 }), leg({ durationS: 300, socStartPct: 90, socEndPct: 60 })],
      perches: [perch({ spanId: 'a', dwellS: 1800, socArrivePct: 40, socDepartPct: 100 }), perch({ spanId: 'b', dwellS: 1200, socArrivePct: 30, socDepartPct: 90 })],
    };
    const s = chargeSeries(plan);
    expect(s.map((p) => [p.tMin, p.socPct, p.phase])).toEqual([
      [0, 100, 'start'],
      [10, 40, 'flight'],
      [40, 100, 'perch'],
      [55, 30, 'flight'],
      [75, 90, 'perch'],
      [80, 60, 'flight'],
    ]);
  });

  it('when the target is within one charge, then the series is the departure and one descent', () => {
    const s = chargeSeries({ legs: [leg({ durationS: 1200, socEndPct: 35 })], perches: [] });
    expect(s).toHaveLength(2);
    expect(s[1]).toMatchObject({ tMin: 20, socPct: 35, phase: 'flight' });
  });

  it('when there are no legs, then there is nothing to draw', () => {
    expect(chargeSeries({ legs: [], perches: [] })).toEqual([]);
  });
});

describe('departure time', () => {
  it('when the browser is two hours east of UTC, then the departure carries +02:00', () => {
    expect(localInputToIso('2026-06-01T09:00', () => 120)).toBe('2026-06-01T09:00:00+02:00');
  });
  it('when the browser is west of UTC with half hours, then the offset is negative with minutes', () => {
    expect(localInputToIso('2026-01-15T23:30', () => -210)).toBe('2026-01-15T23:30:00-03:30');
  });
  it('when the value is not a date-time, then there is no departure', () => {
    expect(localInputToIso('tomorrow', () => 0)).toBeNull();
    expect(localInputToIso('2026-13-01T09:00', () => 0)).toBeNull();
  });
  it('when an instant is shown in the departure offset, then it reads as that wall clock', () => {
    expect(wallClock('2026-06-01T07:42:00Z', '+02:00')).toBe('09:42');
    expect(wallClock('2026-06-01T23:10:00Z', '+02:00', true)).toBe('2026-06-02 01:10');
    expect(offsetOf('2026-06-01T09:00:00+0530')).toBe('+05:30');
    expect(offsetOf('2026-06-01T09:00:00Z')).toBe('+00:00');
  });
});

describe('formatting', () => {
  it('when distances are shown, then metric uses m/km and US uses ft/mi (1 mi = 1609.344 m, exact by definition)', () => {
    expect(formatDistance(850, 'metric')).toBe('850 m');
    expect(formatDistance(11_520, 'metric')).toBe('11.52 km');
    expect(formatDistance(1609.344 * 7.5, 'us')).toBe('7.50 mi');
    expect(formatDistance(30.48, 'us')).toBe('100 ft');
    expect(formatDistance(Number.NaN, 'us')).toBe('—');
  });
  it('when durations and courses are shown, then they read as a person would say them', () => {
    expect(formatDuration(3994)).toBe('1 h 07 min');
    expect(formatDuration(45)).toBe('45 s');
    expect(formatDuration(12 * 60)).toBe('12 min');
    expect(formatCourse(306.87)).toBe('307°');
    expect(formatCourse(-10)).toBe('350°');
    expect(formatCourse(359.7)).toBe('000°');
  });
});

describe('route', () => {
  const base = { lat: 45, lon: 7 };
  const target = { lat: 45.2, lon: 7.3 };
  it('when perches carry positions, then the stops run base, perches, target', () => {
    const plan = { legs: [leg({ toSpanId: 'a' }), leg({})], perches: [perch({ spanId: 'a', lat: 45.1, lon: 7.1 })] };
    expect(routeStops(plan, base, target).map((s) => s.kind)).toEqual(['base', 'perch', 'target']);
  });
  it('when the drone returns to base, then the target sits between the outbound and the return perches', () => {
    const plan = {
      legs: [leg({ toSpanId: 'a' }), leg({}), leg({ toSpanId: 'b' }), leg({})],
      perches: [perch({ spanId: 'a', lat: 45.1, lon: 7.1 }), perch({ spanId: 'b', lat: 45.12, lon: 7.12 })],
    };
    expect(routeStops(plan, base, target, true).map((s) => s.name)).toEqual(['Base', 'Perch 1', 'Target', 'Perch 2', 'Base']);
  });
  it('when the route is drawn for print, then every stop lies inside the drawing and the scale bar is a round length', () => {
    const plan: Pick<FeasiblePlan, 'legs' | 'perches'> = { legs: [leg({ toSpanId: 'a' }), leg({})], perches: [perch({ spanId: 'a', lat: 45.1, lon: 7.1 })] };
    const svg = svgRoute(routeStops(plan, base, target), [], 600, 400)!;
    for (const s of svg.stops) {
      expect(s.x).toBeGreaterThanOrEqual(0);
      expect(s.x).toBeLessThanOrEqual(600);
      expect(s.y).toBeGreaterThanOrEqual(0);
      expect(s.y).toBeLessThanOrEqual(400);
    }
    // North is up: the target (further north) is drawn higher than the base.
    expect(svg.stops[2].y).toBeLessThan(svg.stops[0].y);
    expect([1, 2, 5].some((f) => svg.scale.m / 10 ** Math.floor(Math.log10(svg.scale.m)) === f)).toBe(true);
    expect(svg.route.startsWith('M')).toBe(true);
  });
});

describe('infeasible reason', () => {
  it('when the server names the gap by figures only, then the words state the gap against the reach', () => {
    const t = infeasibleText({ feasible: false, reason: 'gap', gap: { distanceM: 14_200, reachM: 11_520 } }, 'metric');
    expect(t[0]).toBe('No perch bridges a gap of 14.20 km; the drone reaches 11.52 km on one charge.');
  });
  it('when the server gives its own sentence, then that sentence is shown first', () => {
    const t = infeasibleText({ feasible: false, reason: 'Exclude zone North Weir cuts the only leg.' }, 'us');
    expect(t[0]).toBe('Exclude zone North Weir cuts the only leg.');
  });
  it('when the server explains a gap in its SI sentence and figures, then the words use the user’s units and name each bridging span once', () => {
    const t = infeasibleText(
      { feasible: false, reason: 'gap', message: 'No perch bridges the 20.0 km gap …', longestGapM: 20_000, reachM: 11_520, blockedSpans: [{ spanId: 'x', lineName: 'Ridge 33', label: 'R4–R5', reason: 'it is awaiting review, not approved' }] },
      'us',
    );
    // 1 mi = 1 609.344 m (international mile): 20 000 m = 12.43 mi, 11 520 m = 7.16 mi.
    expect(t).toEqual(['No perch bridges a gap of 12.43 mi; the drone reaches 7.16 mi on one charge.', 'Ridge 33 R4–R5 would bridge it but it is awaiting review, not approved.']);
  });
  it('when spans would have bridged the gap, then each is named with the gate it fails', () => {
    const t = infeasibleText({ feasible: false, reason: 'gap', blockedSpans: [{ spanId: 'x', lineName: 'Ridge 33', label: 'R4 → R5', failingGates: ['clearance'] }] }, 'metric');
    expect(t).toContain('Ridge 33 R4 → R5 would bridge it but fails clearance.');
  });
});
