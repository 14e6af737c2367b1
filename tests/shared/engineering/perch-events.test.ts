import { describe, it, expect } from 'vitest';
import { detectPerchEvents, distanceToSegmentM, stationaryRuns, type TrackPoint } from '../../../shared/engineering/perch-events.ts';
import { prng } from '../../../shared/prng.ts';

// A synthetic flight: cruise east, a 3-minute perch on span A (harvesting), cruise, a 2-minute hover in open air,
// a 30 s pause that is too short, then a 90 s stop next to span B with no harvest and a falling battery.
const LAT = -30.2;
const M_LON = 1 / ((Math.PI / 180) * 6_378_137 * Math.cos((LAT * Math.PI) / 180));
const spanA = { id: 'A', lineId: 'L1', from: { lat: LAT, lon: -130.3 + 1000 * M_LON }, to: { lat: LAT, lon: -130.3 + 1300 * M_LON } };
const spanB = { id: 'B', lineId: 'L2', from: { lat: LAT, lon: -130.3 + 5000 * M_LON }, to: { lat: LAT, lon: -130.3 + 5300 * M_LON } };

function track(): TrackPoint[] {
  const rnd = prng(42);
  const pts: TrackPoint[] = [];
  let t = Date.parse('2026-06-01T10:00:00-09:00');
  let x = 0;
  let battery = 90;
  const push = (harvestW: number | null, jitter: number) => {
    pts.push({ t, lat: LAT + (rnd() - 0.5) * jitter * 1e-5, lon: -130.3 + x * M_LON + (rnd() - 0.5) * jitter * M_LON, altitudeM: 20, batteryPct: battery, harvestW });
    t += 5000;
  };
  const cruise = (toX: number) => {
    while (x < toX) {
      x = Math.min(toX, x + 60); // 12 m/s
      battery -= 0.1;
      push(null, 0);
    }
  };
  const stop = (seconds: number, harvestW: number | null, dBattery: number) => {
    for (let s = 0; s < seconds; s += 5) {
      battery += dBattery;
      push(harvestW, 1.5);
    }
  };
  cruise(1150);
  stop(180, 72, 0.2); // perch on A, harvesting
  cruise(3000);
  stop(120, null, -0.05); // hover over a field, no span near
  cruise(4000);
  stop(30, 70, 0.1); // too short to count
  cruise(5150);
  stop(90, 0, -0.05); // beside span B but not harvesting: a hover
  cruise(6000);
  return pts;
}

describe('perch events in a flight track', () => {
  it('when a track has stops of 3 min, 2 min, 30 s and 90 s, then exactly the three over a minute are found', () => {
    const runs = stationaryRuns(track());
    expect(runs).toHaveLength(3);
    expect((runs[0].endT - runs[0].startT) / 1000).toBeGreaterThanOrEqual(170);
    expect((runs[1].endT - runs[1].startT) / 1000).toBeGreaterThanOrEqual(110);
  });

  it('when the stops are matched to spans, then the harvesting one is a perch on A and the others are hovers with the reason', () => {
    const events = detectPerchEvents(track(), [spanA, spanB]);
    expect(events.map((e) => [e.kind, e.spanId])).toEqual([['perch', 'A'], ['hover', null], ['hover', 'B']]);
    expect(events[0].spanDistanceM).toBeLessThan(5);
    expect(events[0].measuredHarvestW).toBeCloseTo(72, 6);
    expect(events[0].batteryEndPct!).toBeGreaterThan(events[0].batteryStartPct!);
    expect(events[1].note).toMatch(/no span within/);
    expect(events[2].note).toMatch(/no harvest/);
  });

  it('when a point lies beside a segment, then its distance is the perpendicular one; past an end, the distance to that end', () => {
    const a = { lat: LAT, lon: -130.3 };
    const b = { lat: LAT, lon: -130.3 + 300 * M_LON };
    // 20 m north of the middle (direct computation on the local flat frame, 1e-5° of latitude ≈ 1.11 m)
    expect(distanceToSegmentM({ lat: LAT + 20 / 111_132.954, lon: -130.3 + 150 * M_LON }, a, b)).toBeCloseTo(20, 3);
    expect(distanceToSegmentM({ lat: LAT, lon: -130.3 + 340 * M_LON }, a, b)).toBeCloseTo(40, 3);
  });
});
