import { describe, it, expect } from 'vitest';
import { geodesicInverse, geodesicLengthM, dmsToDeg } from '../../../shared/engineering/geodesic.ts';

const flindersPeak = { latDeg: dmsToDeg(-37, 57, 3.7203), lonDeg: dmsToDeg(144, 25, 29.5244) };
const buninyong = { latDeg: dmsToDeg(-37, 39, 10.1561), lonDeg: dmsToDeg(143, 55, 35.3839) };

describe('WGS84 geodesic', () => {
  it('when Flinders Peak → Buninyong, then length is 54 972.271 m', () => {
    const r = geodesicInverse(flindersPeak, buninyong);
    expect(Math.abs(r.lengthM - 54972.271)).toBeLessThanOrEqual(0.001); // Geoscience Australia published example, 1 mm
  });

  it('when Flinders Peak → Buninyong, then the azimuth is 306°52′05.37″', () => {
    const r = geodesicInverse(flindersPeak, buninyong);
    expect(Math.abs(r.azimuthDeg - dmsToDeg(306, 52, 5.37)) * 3600).toBeLessThan(0.01); // Geoscience Australia published example, 0.01″
  });

  it('adds polyline legs and handles southern DMS', () => {
    const mid = { latDeg: (flindersPeak.latDeg + buninyong.latDeg) / 2, lonDeg: (flindersPeak.lonDeg + buninyong.lonDeg) / 2 };
    const total = geodesicLengthM([flindersPeak, mid, buninyong]);
    expect(total).toBeGreaterThanOrEqual(geodesicInverse(flindersPeak, buninyong).lengthM - 1e-6); // direct computation (triangle inequality)
    expect(total).toBeLessThan(54972.271 + 1);
    expect(dmsToDeg(-37, 30, 0)).toBe(-37.5); // direct computation
    expect(geodesicLengthM([flindersPeak])).toBe(0);
  });
});
