// What `GET /api/map/area?bbox=` answers: the records an offline area keeps on the device.
export interface AreaContents {
  spans: { id: string; lineId: string }[];
  lineIds: string[];
  structures: number;
  photos: { id: string; spanId: string | null }[];
  /** More spans lie in the box than are listed. */
  truncated: boolean;
}
