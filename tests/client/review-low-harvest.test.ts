// Review-desk queue rows mark spans whose harvest is too low to be useful, in words and the reader's units.
import { describe, expect, it } from 'vitest';
import { lowHarvestMark } from '../../src/features/review/queue.ts';

// A useful-harvest gate as the server lists it (SI parts; the words are the client's).
const usefulHarvest = {
  id: 'useful-harvest',
  label: 'useful harvest',
  detail: '4.2 W at typical load 80 A; useful minimum 10.0 W',
  parts: [{ quantity: 'power', si: 4.23, digits: 1 }, ' at typical load ', { quantity: 'current', si: 80, digits: 0 }, '; useful minimum ', { quantity: 'power', si: 10, digits: 1 }],
  pairs: ['Roost clamp S/R on Light quad'],
} as const;
const clearance = { id: 'clearance', label: 'clearance', detail: '5.10 m measured; code minimum 5.64 m', parts: [{ quantity: 'length', si: 5.1, digits: 2 }, ' measured; code minimum ', { quantity: 'length', si: 5.64, digits: 2 }], pairs: [] } as const;

describe('review desk: low-harvest marks on queue rows', () => {
  it('when a span fails the useful-harvest gate, then its row says so in words with the figures', () => {
    const mark = lowHarvestMark({ failingGates: [clearance, usefulHarvest] as never }, 'metric');
    expect(mark).toBe('Harvest too low to be useful: 4.2 W at typical load 80 A; useful minimum 10.0 W');
  });

  it('when the reader works in US units, then the figures follow them and nothing raw shows', () => {
    const mark = lowHarvestMark({ failingGates: [usefulHarvest] as never }, 'us')!;
    expect(mark).toMatch(/^Harvest too low to be useful: /);
    expect(mark).toMatch(/W/);
    expect(mark).not.toMatch(/useful-harvest|\d\.\d{3,}/);
  });

  it('when the harvest is enough (another gate fails, or none), then the row has no mark', () => {
    expect(lowHarvestMark({ failingGates: [clearance] as never }, 'metric')).toBeNull();
    expect(lowHarvestMark({ failingGates: [] }, 'metric')).toBeNull();
    expect(lowHarvestMark({}, 'metric')).toBeNull();
  });
});
