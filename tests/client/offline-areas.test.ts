// Taking an area offline, the parts that need no browser storage: sizes and ages in words, and the tile cap.
import { describe, expect, it } from 'vitest';
import { age, bytes } from '../../src/lib/format.ts';
import { frameTiles, MAX_AREA_TILES, tooManyMessage } from '../../src/features/offline-areas/areas.ts';
import { tileCounts } from '../../shared/tile-math.ts';

describe('sizes and ages in words', () => {
  it('when a storage size is written, then it reads in decimal units with at most two significant figures below ten', () => {
    // Decimal units (1 kB = 1000 bytes) as browsers report storage estimates (common practice).
    expect(bytes(880)).toBe('880 bytes');
    expect(bytes(1500)).toBe('1.5 kB');
    expect(bytes(312_400_000)).toBe('312 MB');
    expect(bytes(4_100_000_000)).toBe('4.1 GB');
    expect(bytes(999_600)).toBe('1 MB');
    expect(bytes(2_000_000)).toBe('2 MB');
    expect(bytes(null)).toBe('—');
    expect(`${bytes(312_400_000)} of ${bytes(4_100_000_000)}`).toBe('312 MB of 4.1 GB');
  });

  it('when an age is written, then it reads in whole minutes, hours or days', () => {
    const now = Date.UTC(2026, 11, 3, 12, 0, 0);
    expect(age(now - 20_000, now)).toBe('just now');
    expect(age(now - 60_000, now)).toBe('1 minute ago');
    expect(age(now - 5 * 60_000, now)).toBe('5 minutes ago');
    expect(age(now - 3 * 3_600_000, now)).toBe('3 hours ago');
    expect(age(new Date(now - 2 * 86_400_000).toISOString(), now)).toBe('2 days ago');
    expect(age(undefined, now)).toBe('—');
  });
});

describe('the tile cap', () => {
  it('when a frame over a zoom range holds more tile places than one area keeps, then it is refused with the count in words', () => {
    const small: [number, number, number, number] = [-130.33, -30.23, -130.29, -30.19];
    const ok = frameTiles(small, 12, 15);
    expect(ok.tiles).toBe(tileCounts(small, 12, 15).reduce((a, c) => a + c.count, 0));
    expect(ok.tooMany).toBe(false);
    const region: [number, number, number, number] = [-130.6, -30.4, -130.0, -30.0];
    const big = frameTiles(region, 8, 16);
    expect(big.tiles).toBeGreaterThan(MAX_AREA_TILES);
    expect(big.tooMany).toBe(true);
    expect(tooManyMessage(12_345, 10, 16)).toBe('This frame needs 12 345 tiles at zooms 10–16; one area holds at most 4 000. Zoom the map in, draw a smaller box or lower the highest zoom.');
  });
});
