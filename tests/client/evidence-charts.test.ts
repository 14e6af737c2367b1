import { describe, it, expect } from 'vitest';
import { harvestBand, heatCells, monthLabel, rampColour } from '../../src/features/evidence/charts-data.ts';
import { writtenTime, interval } from '../../src/features/evidence/format.ts';
import { flightBounds, flightGeoJson } from '../../src/features/evidence/flight-map-data.ts';
import type { PerchEventView } from '../../src/features/evidence/api.ts';

describe('load evidence charts', () => {
  it('when months have medians, then cells run from chalk at the lowest to night teal at the highest, gaps left empty', () => {
    const { cells, minA, maxA } = heatCells([
      { month: '2026-01', peakA: 900, peakAt: '2026-01-05T18:00:00-09:00', hoursP50A: Array.from({ length: 24 }, (_, h) => 400 + h * 10) },
      { month: '2026-02', peakA: 950, peakAt: '2026-02-05T18:00:00-09:00', hoursP50A: Array.from({ length: 24 }, (_, h) => (h === 3 ? null : 500 + h * 10)) },
    ]);
    expect(cells).toHaveLength(48);
    expect(minA).toBe(400);
    expect(maxA).toBe(730);
    expect(cells[0].colour).toBe('rgb(247, 244, 238)');
    expect(cells.find((c) => c.month === '2026-02' && c.hour === 23)!.colour).toBe('rgb(18, 52, 59)');
    expect(cells.find((c) => c.month === '2026-02' && c.hour === 3)!.colour).toBe('transparent');
    expect(rampColour(0.5)).toBe('rgb(201, 143, 40)');
  });

  it('when harvest hours are given, then the band holds P10 and P90 rounded to 0.1 W and hours read as clock times', () => {
    const rows = harvestBand([{ hour: 7, p10W: 12.345, p50W: 20.04, p90W: 31.96 }]);
    expect(rows).toEqual([{ hour: '07:00', band: [12.3, 32], p50W: 20 }]);
  });

  it('when times and months are shown, then they read as written with their offset', () => {
    expect(writtenTime('2026-03-01T14:15:00+12:00')).toBe('1 Mar 2026, 14:15 (UTC+12:00)');
    expect(monthLabel('2026-12')).toBe('Dec 2026');
    expect(interval(900)).toBe('15 min');
    expect(interval(3600)).toBe('1 h');
  });
});

describe('flight record on the map', () => {
  const ev = (over: Partial<PerchEventView>): PerchEventView => ({
    id: 'e', kind: 'perch', spanId: null, lineId: null, startAt: '2026-06-01T10:00:00-09:00', endAt: '2026-06-01T10:03:00-09:00', durationS: 180,
    lat: -30.2, lon: -130.3, spanDistanceM: null, measuredW: null, predictedW: null, predictedSource: null, lineCurrentA: null, impliedCurrentA: null,
    meteredCurrentA: null, batteryStartPct: null, batteryEndPct: null, note: null, ratio: null, lowHarvest: false, ...over,
  });

  it('when a record has perches and a hover, then the map gets the track, one numbered point per stop and the matched spans once each', () => {
    const record = {
      track: [[-130.31, -30.2], [-130.3, -30.2], [-130.29, -30.21]] as [number, number][],
      events: [
        ev({ id: 'a', spanId: 'S1', spanDistanceM: 0.4, lowHarvest: true, lon: -130.3 }),
        ev({ id: 'b', kind: 'hover', note: 'no span within 15 m', lon: -130.295, lat: -30.205 }),
        ev({ id: 'c', spanId: 'S1', spanDistanceM: 1.2, lon: -130.29, lat: -30.21 }),
      ],
    };
    const g = flightGeoJson(record);
    expect(g.track.features).toHaveLength(1);
    expect(g.track.features[0].geometry.coordinates).toEqual(record.track);
    expect(g.stops.features.map((f) => f.properties.label)).toEqual(['Perch 1', 'Hover 2', 'Perch 3']);
    expect(g.stops.features[0].properties).toMatchObject({ kind: 'perch', spanId: 'S1', spanDistanceM: 0.4, lowHarvest: true, eventId: 'a' });
    expect(g.stops.features[1].geometry.coordinates).toEqual([-130.295, -30.205]);
    expect(g.matchedSpanIds).toEqual(['S1']);
    expect(flightBounds(record)).toEqual([-130.31, -30.21, -130.29, -30.2]);
  });

  it('when a record is empty, then nothing is drawn and there are no bounds', () => {
    const g = flightGeoJson({ track: [], events: [] });
    expect(g.track.features).toEqual([]);
    expect(g.stops.features).toEqual([]);
    expect(flightBounds({ track: [], events: [] })).toBeNull();
  });
});
