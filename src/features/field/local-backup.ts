// Unsaved span-form entries kept on the device, so a dropped connection, a closed tab or a flat battery loses nothing.
import type { SpanFormValues } from './form-values.ts';

export interface FormBackup {
  values: SpanFormValues;
  /** The record version the entries were made on (null for a new span): a restore saves against it, so a newer record raises the conflict view. */
  baseVersion: number | null;
  savedAt: string;
}

const PREFIX = 'roostline:span-form:';

export function backupKey(userId: string, spanId: string | null) {
  return `${PREFIX}${userId}:${spanId ?? 'new'}`;
}

export function writeBackup(storage: Pick<Storage, 'setItem'>, key: string, backup: FormBackup) {
  try {
    storage.setItem(key, JSON.stringify(backup));
  } catch {
    // Storage full or disabled (private mode): the form still works, only without the device copy.
  }
}

export function readBackup(storage: Pick<Storage, 'getItem'>, key: string): FormBackup | null {
  try {
    const raw = storage.getItem(key);
    if (!raw) return null;
    const b = JSON.parse(raw) as Partial<FormBackup>;
    if (!b || typeof b !== 'object' || !b.values || typeof b.values !== 'object' || typeof b.savedAt !== 'string' || !Array.isArray(b.values.hazards)) return null;
    return { values: b.values as SpanFormValues, baseVersion: typeof b.baseVersion === 'number' ? b.baseVersion : null, savedAt: b.savedAt };
  } catch {
    return null;
  }
}

export function clearBackup(storage: Pick<Storage, 'removeItem'>, key: string) {
  try {
    storage.removeItem(key);
  } catch {
    /* nothing to clear */
  }
}

/** A backup worth offering: it holds something the saved record (or the empty form) does not. */
export function backupDiffers(backup: FormBackup, current: SpanFormValues): boolean {
  return JSON.stringify(backup.values) !== JSON.stringify(current);
}
