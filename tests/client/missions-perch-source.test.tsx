// The plan's perch table says which load each perch's harvest rests on: the line's metered month or the typed estimate.
import { afterEach, describe, expect, it } from 'vitest';
import { cleanup, render, screen } from '@testing-library/react';
import { MemoryRouter } from 'react-router';
import { PerchTable, perchLoadSource } from '../../src/features/missions/plan-views.tsx';
import type { FeasiblePlan, PlanPerch } from '../../src/features/missions/types.ts';

afterEach(cleanup);

const perch = (over: Partial<PlanPerch>): PlanPerch => ({
  spanId: 'S1', lineId: 'L1', arriveAt: '2026-06-10T09:40:00+02:00', departAt: '2026-06-10T10:40:00+02:00', dwellS: 3600, harvestW: 41.2,
  socArrivePct: 22, socDepartPct: 100, lineBearingDeg: 90, conductorHeightM: 15, spanLabel: 'OT69-014 → OT69-015', lineName: 'Ostlemere 69 kV', voltageKv: 69, ...over,
});

describe('perch load source', () => {
  it('when a perch rests on a metered month, then it reads "measured, <month year>"; on the estimate, "typed estimate"', () => {
    expect(perchLoadSource({ harvestSource: 'series', loadMonth: '2026-06' })).toBe('measured, June 2026');
    expect(perchLoadSource({ harvestSource: 'estimate', loadMonth: null })).toBe('typed estimate');
  });

  it('when the plan has one perch of each kind, then the table names each source under its harvest', () => {
    const plan: FeasiblePlan = {
      feasible: true, totalDistanceM: 24_000, totalDurationS: 9000, legs: [],
      perches: [perch({ harvestSource: 'series', loadMonth: '2026-06' }), perch({ spanId: 'S2', harvestSource: 'estimate', loadMonth: null })],
    };
    render(<MemoryRouter><PerchTable plan={plan} lines={[]} offset="+02:00" system="metric" /></MemoryRouter>);
    expect(screen.getAllByTestId('perch-load-source').map((e) => e.textContent)).toEqual(['load: measured, June 2026', 'load: typed estimate']);
  });
});
