// The span form's device copy: written as the surveyor types, offered back only when it holds something new.
import { describe, expect, it } from 'vitest';
import { emptySpanForm } from '../../src/features/field/form-values.ts';
import { backupDiffers, backupKey, clearBackup, readBackup, writeBackup } from '../../src/features/field/local-backup.ts';

function memoryStorage() {
  const m = new Map<string, string>();
  return { getItem: (k: string) => m.get(k) ?? null, setItem: (k: string, v: string) => void m.set(k, v), removeItem: (k: string) => void m.delete(k), size: () => m.size };
}

describe('span form device copy', () => {
  const empty = emptySpanForm(new Date(2026, 0, 2));

  it('when entries are written, then they read back with their base version, per user and per span', () => {
    const s = memoryStorage();
    const values = { ...empty, clearance: '31', hazards: [{ kindId: 'public-access', severity: 'medium' as const, positionAlong: '', note: 'path' }] };
    writeBackup(s, backupKey('U1', 'SP9'), { values, baseVersion: 4, savedAt: '2026-01-02T10:00:00.000Z' });
    expect(readBackup(s, backupKey('U1', 'SP9'))).toEqual({ values, baseVersion: 4, savedAt: '2026-01-02T10:00:00.000Z' });
    expect(readBackup(s, backupKey('U2', 'SP9'))).toBeNull();
    expect(readBackup(s, backupKey('U1', null))).toBeNull();
    clearBackup(s, backupKey('U1', 'SP9'));
    expect(s.size()).toBe(0);
  });

  it('when the stored copy is damaged or foreign, then nothing is offered', () => {
    const s = memoryStorage();
    s.setItem(backupKey('U1', null), '{not json');
    expect(readBackup(s, backupKey('U1', null))).toBeNull();
    s.setItem(backupKey('U1', null), JSON.stringify({ values: { clearance: '3' }, savedAt: 'x' }));
    expect(readBackup(s, backupKey('U1', null))).toBeNull();
  });

  it('when storage refuses writes, then the form carries on', () => {
    const full = { setItem: () => { throw new Error('QuotaExceededError'); } };
    expect(() => writeBackup(full, 'k', { values: empty, baseVersion: null, savedAt: '' })).not.toThrow();
  });

  it('offers a copy only when it differs from what the form would show anyway', () => {
    expect(backupDiffers({ values: empty, baseVersion: null, savedAt: '' }, empty)).toBe(false);
    expect(backupDiffers({ values: { ...empty, terrain: 'road' }, baseVersion: null, savedAt: '' }, empty)).toBe(true);
  });
});
