// Geodesic span length and azimuth on the WGS84 ellipsoid (Karney's algorithm via GeographicLib).
import geodesic from 'geographiclib-geodesic';

export interface LatLon {
  latDeg: number;
  lonDeg: number;
}

export interface GeodesicResult {
  lengthM: number;
  /** Forward azimuth at the start point, degrees clockwise from north, 0..360. */
  azimuthDeg: number;
  /** Forward azimuth at the end point, degrees clockwise from north, 0..360. */
  endAzimuthDeg: number;
}

const wgs84 = geodesic.Geodesic.WGS84;
const INVERSE_MASK = geodesic.Geodesic.DISTANCE | geodesic.Geodesic.AZIMUTH;

const to360 = (deg: number) => ((deg % 360) + 360) % 360;

// Karney (2013) inverse geodesic problem on WGS84 (GeographicLib).
export function geodesicInverse(from: LatLon, to: LatLon): GeodesicResult {
  const r = wgs84.Inverse(from.latDeg, from.lonDeg, to.latDeg, to.lonDeg, INVERSE_MASK);
  return { lengthM: r.s12 ?? 0, azimuthDeg: to360(r.azi1 ?? 0), endAzimuthDeg: to360(r.azi2 ?? 0) };
}

// Karney (2013) geodesic length of a polyline on WGS84 (GeographicLib), metres.
export function geodesicLengthM(points: readonly LatLon[]): number {
  let total = 0;
  for (let i = 1; i < points.length; i++) total += geodesicInverse(points[i - 1]!, points[i]!).lengthM;
  return total;
}

// Sexagesimal degrees, minutes, seconds → decimal degrees (sign taken from the degrees).
export function dmsToDeg(degrees: number, minutes = 0, seconds = 0): number {
  const sign = degrees < 0 || Object.is(degrees, -0) ? -1 : 1;
  return sign * (Math.abs(degrees) + minutes / 60 + seconds / 3600);
}
