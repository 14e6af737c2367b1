// How the screens write times, durations, counts, scores and internal codes: one place, one format.
// Quantities with units go through formatQuantity in shared/units.ts (metric or US as the user chose).
import { detailText, type DetailPart } from '#shared/engineering/assessment.ts';
import type { UnitSystem } from '#shared/units.ts';

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
const pad = (n: number) => String(n).padStart(2, '0');

function parsed(value: string | number | Date | null | undefined): Date | null {
  if (value === null || value === undefined || value === '') return null;
  const d = value instanceof Date ? value : new Date(value);
  return Number.isNaN(d.getTime()) ? null : d;
}

/** "3 Dec 2026, 14:05" in the viewer's time zone; null or unreadable → "—". */
export function dateTime(value: string | number | Date | null | undefined): string {
  const d = parsed(value);
  if (!d) return '—';
  return `${d.getDate()} ${MONTHS[d.getMonth()]} ${d.getFullYear()}, ${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/**
 * "3 Dec 2026". A plain calendar date ("2026-12-03", as survey dates are stored) reads as written, never shifted
 * by the viewer's time zone; a timestamp reads in the viewer's zone.
 */
export function date(value: string | number | Date | null | undefined): string {
  if (typeof value === 'string') {
    const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(value);
    if (m) return `${Number(m[3])} ${MONTHS[Number(m[2]) - 1]} ${m[1]}`;
  }
  const d = parsed(value);
  if (!d) return '—';
  return `${d.getDate()} ${MONTHS[d.getMonth()]} ${d.getFullYear()}`;
}

/**
 * A time as written with its own UTC offset, never converted: "2026-03-01T14:15:00+12:00" → "1 Mar 2026, 14:15 (UTC+12:00)";
 * without an offset the clock reads as written with `noOffset` in brackets (e.g. the camera's local time).
 */
export function writtenDateTime(iso: string, noOffset?: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::\d{2}(?:\.\d+)?)?(Z|[+-]\d{2}:\d{2})?$/.exec(iso);
  if (!m) return iso;
  const [, y, mo, d, h, mi, off] = m;
  const zone = off === 'Z' ? 'UTC' : off ? `UTC${off}` : noOffset;
  return `${Number(d)} ${MONTHS[Number(mo) - 1]} ${y}, ${h}:${mi}${zone ? ` (${zone})` : ''}`;
}

/** Minutes in words: 481 → "8 h 1 min", 45 → "45 min", 0.4 → "under 1 min", 3000 → "2 d 2 h"; never/∞ → "never". */
export function duration(minutes: number | null | undefined): string {
  if (minutes === null || minutes === undefined || Number.isNaN(minutes)) return '—';
  if (!Number.isFinite(minutes)) return 'never';
  const m = Math.round(minutes);
  if (m < 1) return minutes > 0 ? 'under 1 min' : '0 min';
  const days = Math.floor(m / 1440);
  const hours = Math.floor((m % 1440) / 60);
  const mins = m % 60;
  if (days > 0) return hours ? `${days} d ${hours} h` : `${days} d`;
  if (hours > 0) return mins ? `${hours} h ${mins} min` : `${hours} h`;
  return `${mins} min`;
}

/** A whole count with thin grouping: 35040 → "35 040". */
export function count(n: number | null | undefined): string {
  if (n === null || n === undefined || !Number.isFinite(n)) return '—';
  return Math.round(n).toLocaleString('en-US').replace(/,/g, ' ');
}

/** A 0–100 score, whole points: 72.4381 → "72". */
export function score(n: number | null | undefined): string {
  if (n === null || n === undefined || !Number.isFinite(n)) return '—';
  return String(Math.round(n));
}

/** A share of 1 as a whole percentage: 0.8734 → "87 %"; `digits` for finer steps. */
export function percent(fraction: number | null | undefined, digits = 0): string {
  if (fraction === null || fraction === undefined || !Number.isFinite(fraction)) return '—';
  return `${(fraction * 100).toFixed(digits)} %`;
}

/**
 * A plain number rounded for reading: three significant figures at most, never more than two decimals,
 * trailing zeros dropped: 9.4000001 → "9.4", 0.123456 → "0.12", 1234.56 → "1 235".
 */
export function number(n: number | null | undefined): string {
  if (n === null || n === undefined || Number.isNaN(n)) return '—';
  if (!Number.isFinite(n)) return n > 0 ? '∞' : '−∞';
  const abs = Math.abs(n);
  const digits = abs >= 100 ? 0 : abs >= 10 ? 1 : 2;
  const rounded = Number(n.toFixed(digits));
  return (Object.is(rounded, -0) ? 0 : rounded).toLocaleString('en-US', { maximumFractionDigits: digits }).replace(/,/g, ' ');
}

/** An internal code in words: "open-field" → "Open field", "password_reset" → "Password reset", "us" → "US". */
export function codeWords(code: string): string {
  const special: Record<string, string> = { us: 'US', si: 'SI', gpx: 'GPX', kml: 'KML', csv: 'CSV', geojson: 'GeoJSON' };
  if (special[code.toLowerCase()]) return special[code.toLowerCase()];
  const words = code
    .replace(/([a-z0-9])([A-Z])/g, '$1 $2')
    .split(/[-_.\s]+/)
    .filter(Boolean)
    .map((w) => w.toLowerCase());
  if (!words.length) return code;
  const text = words.join(' ');
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** A gate's detail in the user's units: from its parts when the assessment carries them, else the stored words. */
export function gateDetail(g: { detail: string; parts?: readonly DetailPart[] }, system: UnitSystem): string {
  return g.parts?.length ? detailText(g.parts, system) : g.detail;
}

/**
 * A storage size in decimal units (as the browser's storage estimate and disk sizes are told): 312_400_000 →
 * "312 MB", 4_100_000_000 → "4.1 GB", 880 → "880 bytes". Two significant figures below 10, whole numbers above.
 */
export function bytes(n: number | null | undefined): string {
  if (n === null || n === undefined || !Number.isFinite(n) || n < 0) return '—';
  if (n < 1000) return `${Math.round(n)} bytes`;
  const units = ['kB', 'MB', 'GB', 'TB'];
  let v = n / 1000;
  let i = 0;
  while (v >= 999.5 && i < units.length - 1) {
    v /= 1000;
    i++;
  }
  return `${v < 9.95 ? v.toFixed(1).replace(/\.0$/, '') : String(Math.round(v))} ${units[i]}`;
}

/** How long ago, in words, from `now`: "just now", "5 minutes ago", "3 hours ago", "2 days ago". */
export function age(value: string | number | Date | null | undefined, now: number = Date.now()): string {
  const d = parsed(value);
  if (!d) return '—';
  const s = Math.max(0, (now - d.getTime()) / 1000);
  const ago = (n: number, unit: string) => `${n} ${unit}${n === 1 ? '' : 's'} ago`;
  if (s < 60) return 'just now';
  if (s < 3600) return ago(Math.floor(s / 60), 'minute');
  if (s < 86_400) return ago(Math.floor(s / 3600), 'hour');
  return ago(Math.floor(s / 86_400), 'day');
}
