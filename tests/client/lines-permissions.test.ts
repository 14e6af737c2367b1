// Line permissions: which ones count as expired or not yet valid on a given day.
import { describe, expect, it } from 'vitest';
import { isExpired, isNotYetValid } from '../../src/features/lines/api.ts';

describe('permission validity', () => {
  it('when today is after the last valid day, then the permission is expired; on that day it still holds', () => {
    expect(isExpired({ validTo: '2026-05-31' }, '2026-06-01')).toBe(true);
    expect(isExpired({ validTo: '2026-06-01' }, '2026-06-01')).toBe(false);
  });
  it('when the server says whether it expired, then its word wins', () => {
    expect(isExpired({ validTo: '2099-01-01', expired: true }, '2026-06-01')).toBe(true);
  });
  it('when today is before the first valid day, then it is not yet valid', () => {
    expect(isNotYetValid({ validFrom: '2026-07-01' }, '2026-06-01')).toBe(true);
    expect(isNotYetValid({ validFrom: '2026-06-01' }, '2026-06-01')).toBe(false);
  });
});
