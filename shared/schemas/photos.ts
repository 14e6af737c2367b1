// Photo records as the API returns them (SI units: m, degrees).
export interface PhotoView {
  id: string;
  spanId: string | null;
  hazardId: string | null;
  uploaderId: string;
  lat: number | null;
  lon: number | null;
  altitudeM: number | null;
  bearingDeg: number | null;
  bearingRef: string | null;
  /** As written in the file: ISO 8601 with its offset, or a local time without one (takenAtHasOffset false). */
  takenAt: string | null;
  takenAtHasOffset: boolean;
  positionSource: 'exif' | 'manual' | null;
  contentType: string;
  width: number;
  height: number;
  bytes: number;
  thumbnailUrl: string;
  displayUrl: string;
  originalUrl: string;
  createdAt: string;
}

/** Upload, GET /:id and PATCH answers also carry the spans within 60 m, nearest first. */
export interface PhotoViewWithSuggestions extends PhotoView {
  suggestedSpanIds: string[];
  suggestions: { spanId: string; distanceM: number }[];
}
