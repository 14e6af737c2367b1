import { FLIGHT_CSV_COLUMNS } from './flight-record.parse.ts';

/** A starting file: the columns and a few invented points (a short approach and the first seconds of a perch). */
export function flightTemplateCsv(): string {
  return [
    FLIGHT_CSV_COLUMNS.join(','),
    '2026-06-01T10:00:00-09:00,-30.20000,-130.30000,40.0,88.0,',
    '2026-06-01T10:00:05-09:00,-30.20000,-130.29940,32.0,87.9,',
    '2026-06-01T10:00:10-09:00,-30.20000,-130.29880,24.5,87.8,0',
    '2026-06-01T10:00:15-09:00,-30.20000,-130.29880,24.5,87.9,71.8',
  ].join('\n') + '\n';
}
