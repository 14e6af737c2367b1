import { formatQuantity, type UnitSystem } from '#shared/units.ts';
import type { Photo } from './types.ts';
import { writtenDateTime } from '../../lib/format.ts';

/** "4 May 2026, 10:11 (UTC+09:30)", or "… (camera's local time)" when the file gave no offset; never converted to the viewer's zone. */
export function formatTakenAt(p: Pick<Photo, 'takenAt' | 'takenAtHasOffset'>): string {
  if (!p.takenAt) return 'Capture time unknown';
  return writtenDateTime(p.takenAt, "camera's local time");
}

export function formatPosition(p: Pick<Photo, 'lat' | 'lon'>): string {
  if (p.lat === null || p.lon === null) return 'No position';
  const ns = p.lat < 0 ? 'S' : 'N';
  const ew = p.lon < 0 ? 'W' : 'E';
  return `${Math.abs(p.lat).toFixed(5)}° ${ns}, ${Math.abs(p.lon).toFixed(5)}° ${ew}`;
}

export function formatBearing(p: Pick<Photo, 'bearingDeg' | 'bearingRef'>): string | null {
  if (p.bearingDeg === null) return null;
  return `${Math.round(p.bearingDeg)}° ${p.bearingRef === 'M' ? 'magnetic' : 'true'}`;
}

export function formatAltitude(p: Pick<Photo, 'altitudeM'>, system: UnitSystem): string | null {
  return p.altitudeM === null ? null : formatQuantity(p.altitudeM, 'length', system, { digits: 0 });
}

export function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(0)} KB`;
  return `${(n / (1024 * 1024)).toFixed(1)} MB`;
}
