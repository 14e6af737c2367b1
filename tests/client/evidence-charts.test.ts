import { describe, it, expect } from 'vitest';
import { harvestBand, heatCells, monthLabel, rampColour } from '../../src/features/evidence/charts-data.ts';
import { writtenTime, interval } from '../../src/features/evidence/format.ts';

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
