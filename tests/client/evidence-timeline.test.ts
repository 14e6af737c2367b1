// Planned against flown: the mission's legs and dwells and the flight record's, in minutes from the planned departure.
import { describe, expect, it } from 'vitest';
import { flownSegments, plannedSegments, plannedVsFlown, timelineChartData } from '../../src/features/evidence/timeline-data.ts';

const plan = {
  departAt: '2026-06-10T09:00:00+02:00',
  legs: [{ durationS: 600, toSpanId: 'A' }, { durationS: 900, toSpanId: 'B' }, { durationS: 300 }],
  perches: [{ spanId: 'A', dwellS: 3600 }, { spanId: 'B', dwellS: 1800 }],
};
// Took off 5 min late (07:05 UTC = 09:05 +02:00), perched on A and B, landed.
const record = {
  startedAt: '2026-06-10T07:05:00+00:00',
  endedAt: '2026-06-10T09:20:00+00:00',
  events: [
    { kind: 'perch' as const, spanId: 'A', startAt: '2026-06-10T07:16:00+00:00', endAt: '2026-06-10T08:10:00+00:00', durationS: 3240 },
    { kind: 'hover' as const, spanId: null, startAt: '2026-06-10T08:15:00+00:00', endAt: '2026-06-10T08:17:00+00:00', durationS: 120 },
    { kind: 'perch' as const, spanId: 'B', startAt: '2026-06-10T08:26:00+00:00', endAt: '2026-06-10T09:10:00+00:00', durationS: 2640 },
  ],
};

describe('planned against flown', () => {
  it('when a plan has legs ending on perches, then each leg is followed by its dwell, end to end', () => {
    expect(plannedSegments(plan)).toEqual([
      { kind: 'flight', startMin: 0, endMin: 10 },
      { kind: 'dwell', startMin: 10, endMin: 70, spanId: 'A' },
      { kind: 'flight', startMin: 70, endMin: 85 },
      { kind: 'dwell', startMin: 85, endMin: 115, spanId: 'B' },
      { kind: 'flight', startMin: 115, endMin: 120 },
    ]);
  });

  it('when a record took off late, then its segments start after the planned departure, hovers count as flight, offsets cancel', () => {
    expect(flownSegments(record, Date.parse(plan.departAt))).toEqual([
      { kind: 'flight', startMin: 5, endMin: 16 },
      { kind: 'dwell', startMin: 16, endMin: 70, spanId: 'A' },
      { kind: 'flight', startMin: 70, endMin: 86 },
      { kind: 'dwell', startMin: 86, endMin: 130, spanId: 'B' },
      { kind: 'flight', startMin: 130, endMin: 140 },
    ]);
  });

  it('when both are compared, then each planned perch meets the flown one on its span with dwell and arrival differences', () => {
    const c = plannedVsFlown(plan, record);
    expect(c.startDeltaMin).toBe(5);
    expect(c.plannedDurationMin).toBe(120);
    expect(c.flownDurationMin).toBe(135);
    expect(c.perches).toEqual([
      { spanId: 'A', plannedDwellS: 3600, flownDwellS: 3240, arrivalDeltaMin: 6 },
      { spanId: 'B', plannedDwellS: 1800, flownDwellS: 2640, arrivalDeltaMin: 1 },
    ]);
    // Stacked from the axis start: a transparent lead, then each segment's length end to end.
    const { keys, data } = timelineChartData(c.rows, 0);
    expect(keys).toEqual(['s0', 's1', 's2', 's3', 's4']);
    expect(data[0]).toEqual({ row: 'Planned', lead: 0, s0: 10, s1: 60, s2: 15, s3: 30, s4: 5 });
    expect(data[1]).toEqual({ row: 'Flown', lead: 5, s0: 11, s1: 54, s2: 16, s3: 44, s4: 10 });
    expect(timelineChartData(c.rows, -15).data[1].lead).toBe(20);
  });

  it('when the flight skipped a planned perch and perched elsewhere, then the planned one has no flown figures and the other is listed', () => {
    const c = plannedVsFlown(plan, { ...record, events: [{ ...record.events[0], spanId: 'C' }] });
    expect(c.perches.map((p) => [p.spanId, p.flownDwellS === null, p.plannedDwellS === null])).toEqual([
      ['A', true, false],
      ['B', true, false],
      ['C', false, true],
    ]);
  });
});
