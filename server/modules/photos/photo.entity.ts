import { EntitySchema } from '@mikro-orm/core';

/** Content types the photo pipeline accepts (judged from the bytes, never from the file name). */
export type PhotoContentType = 'image/jpeg' | 'image/png' | 'image/webp' | 'image/avif';

/**
 * One uploaded photo. The original and its two derivatives live in PhotoStorage under
 * `storageKey` + `.original` / `.display.jpg` / `.thumb.jpg`; the key is generated, never the client's file name.
 */
export class Photo {
  id!: string;
  spanId: string | null = null;
  hazardId: string | null = null;
  uploaderId!: string;
  /** WGS84 degrees, signed by hemisphere (S and W negative); null when the file has no GPS and nobody placed it. */
  lat: number | null = null;
  lon: number | null = null;
  /** Metres above sea level, negative below it (GPSAltitudeRef applied). */
  altitudeM: number | null = null;
  /** Direction the camera pointed, degrees 0–360 from north (GPSImgDirection). */
  bearingDeg: number | null = null;
  /** 'T' true north, 'M' magnetic north, as the file says; null when unknown. */
  bearingRef: string | null = null;
  /** Capture time as written in the file: ISO 8601 with its offset, or a local time without offset (see takenAtHasOffset). */
  takenAt: string | null = null;
  takenAtHasOffset = false;
  /** 'exif' when the position came from the file, 'manual' once someone placed it by hand, null without a position. */
  positionSource: 'exif' | 'manual' | null = null;
  contentType!: PhotoContentType;
  /** Upright pixel size of the original (after EXIF orientation). */
  width!: number;
  height!: number;
  bytes!: number;
  storageKey!: string;
  createdAt: Date = new Date();
}

export const PhotoSchema = new EntitySchema<Photo>({
  class: Photo,
  tableName: 'photos',
  properties: {
    id: { type: 'string', primary: true },
    spanId: { type: 'string', nullable: true, index: true },
    hazardId: { type: 'string', nullable: true, index: true },
    uploaderId: { type: 'string', index: true },
    lat: { type: 'double', nullable: true },
    lon: { type: 'double', nullable: true },
    altitudeM: { type: 'double', nullable: true },
    bearingDeg: { type: 'double', nullable: true },
    bearingRef: { type: 'string', nullable: true },
    takenAt: { type: 'string', nullable: true },
    takenAtHasOffset: { type: 'boolean', default: false },
    positionSource: { type: 'string', nullable: true },
    contentType: { type: 'string' },
    width: { type: 'integer' },
    height: { type: 'integer' },
    bytes: { type: 'integer' },
    storageKey: { type: 'string', unique: true },
    createdAt: { type: 'Date' },
  },
});
