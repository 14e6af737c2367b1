// How load-evidence times read: as written in the file, with its UTC offset, so the hour of day matches the data.
export const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/** "2026-03-01T14:15:00+12:00" → "1 Mar 2026, 14:15 (UTC+12:00)". */
export function writtenTime(iso: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::\d{2})?(Z|[+-]\d{2}:\d{2})?$/.exec(iso);
  if (!m) return iso;
  const [, y, mo, d, h, mi, off] = m;
  return `${Number(d)} ${MONTHS[Number(mo) - 1]} ${y}, ${h}:${mi}${off ? ` (UTC${off === 'Z' ? '' : off})` : ''}`;
}

/** A count with thousands separators: 35 040. */
export function count(n: number): string {
  return n.toLocaleString('en-GB').replace(/,/g, ' ');
}

/** A reading interval in words: 900 → "15 min". */
export function interval(s: number | null): string {
  if (s === null) return '—';
  if (s % 3600 === 0) return `${s / 3600} h`;
  if (s % 60 === 0) return `${s / 60} min`;
  return `${s} s`;
}
