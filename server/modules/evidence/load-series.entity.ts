import { EntitySchema } from '@mikro-orm/core';

/**
 * One line's metered currents for one local day, packed: per reading 12 bytes (uint32 epoch seconds, int16 offset
 * minutes as written, 2 spare, float32 current A), in time order. A year at 15 min is 365 rows of ~1.2 kB per line.
 */
export class LoadSeriesDay {
  lineId!: string;
  /** Local date as written in the timestamps (YYYY-MM-DD). */
  day!: string;
  readingCount!: number;
  readings!: Buffer;
}

export const LoadSeriesDaySchema = new EntitySchema<LoadSeriesDay>({
  class: LoadSeriesDay,
  tableName: 'load_series_days',
  properties: {
    lineId: { type: 'string', primary: true },
    day: { type: 'string', primary: true },
    readingCount: { type: 'integer' },
    readings: { type: 'blob' },
  },
});

/** What a line's metered series holds, kept beside the packed days so the line page need not scan them. */
export class LoadSeries {
  lineId!: string;
  firstAt!: string;
  lastAt!: string;
  readingCount!: number;
  dayCount!: number;
  importedById!: string;
  importedAt: Date = new Date();
}

export const LoadSeriesSchema = new EntitySchema<LoadSeries>({
  class: LoadSeries,
  tableName: 'load_series',
  properties: {
    lineId: { type: 'string', primary: true },
    firstAt: { type: 'string' },
    lastAt: { type: 'string' },
    readingCount: { type: 'integer' },
    dayCount: { type: 'integer' },
    importedById: { type: 'string' },
    importedAt: { type: 'Date' },
  },
});
