// How load-evidence times read: as written in the file, with its UTC offset, so the hour of day matches the data.
import { writtenDateTime } from '../../lib/format.ts';

export const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/** "2026-03-01T14:15:00+12:00" → "1 Mar 2026, 14:15 (UTC+12:00)" (the app's one date format, src/lib/format.ts). */
export function writtenTime(iso: string): string {
  return writtenDateTime(iso);
}

/** A count with thousands separators: 35 040. */
export { count } from '../../lib/format.ts';

/** A reading interval in words: 900 → "15 min". */
export function interval(s: number | null): string {
  if (s === null) return '—';
  if (s % 3600 === 0) return `${s / 3600} h`;
  if (s % 60 === 0) return `${s / 60} min`;
  return `${s} s`;
}
