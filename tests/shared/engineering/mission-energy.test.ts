import { describe, it, expect } from 'vitest';
import { windTriangle, maxGroundSpeedMps } from '../../../shared/engineering/wind-triangle.ts';
import { calmReachM, conductorHeightAtM, dwellS, legEnergy, localHour, usableWh, type MissionDrone } from '../../../shared/engineering/mission-energy.ts';
import { evaluateLeg, CALM } from '../../../shared/engineering/mission-leg.ts';
import { dmsToDeg } from '../../../shared/engineering/geodesic.ts';

// The worked example of engineering.md §10 (direct computation): V = 12 m/s, 300 W, 100 Wh, 20 % reserve.
const drone: MissionDrone = {
  batteryWh: 100,
  reservePercent: 20,
  cruiseSpeedMps: 12,
  windLimitMps: 12,
  cruisePowerW: 300,
  perchManoeuvreWh: 0,
  chargeEfficiency: 0.95,
  chargeToPercent: 100,
};
const reachWithWind = (windFromDeg: number, windSpeedMps: number, courseDeg: number) => {
  const w = windTriangle({ airspeedMps: 12, windSpeedMps, windFromDeg, courseDeg });
  return (usableWh(drone, 100) * 3600 * w.groundSpeedMps) / drone.cruisePowerW;
};

describe('wind triangle (FAA Pilot’s Handbook of Aeronautical Knowledge, navigation chapter; worked example engineering.md §10)', () => {
  it('when calm, then 80 Wh usable gives 0.2667 h and a reach of 11.52 km', () => {
    expect(usableWh(drone, 100)).toBeCloseTo(80, 9); // engineering.md §10: 100 Wh × (100 − 20) % = 80 Wh
    expect(calmReachM(drone, 100)).toBeCloseTo(11_520, 6); // engineering.md §10: 11.52 km
  });
  it('when a 4 m/s headwind, then ground speed is 8 m/s and the reach 7.68 km', () => {
    const w = windTriangle({ airspeedMps: 12, windSpeedMps: 4, windFromDeg: 0, courseDeg: 0 });
    expect(w.groundSpeedMps).toBeCloseTo(8, 9); // engineering.md §10
    expect(w.windCorrectionDeg).toBeCloseTo(0, 9);
    expect(reachWithWind(0, 4, 0)).toBeCloseTo(7_680, 6); // engineering.md §10: 7.68 km
  });
  it('when a 4 m/s tailwind, then ground speed is 16 m/s and the reach 15.36 km', () => {
    const w = windTriangle({ airspeedMps: 12, windSpeedMps: 4, windFromDeg: 180, courseDeg: 0 });
    expect(w.groundSpeedMps).toBeCloseTo(16, 9); // engineering.md §10
    expect(reachWithWind(180, 4, 0)).toBeCloseTo(15_360, 6); // engineering.md §10: 15.36 km
  });
  it('when 4 m/s from 90° on course 0°, then WCA 19.47°, GS 11.314 m/s, reach 10.86 km', () => {
    const w = windTriangle({ airspeedMps: 12, windSpeedMps: 4, windFromDeg: 90, courseDeg: 0 });
    expect(w.windCorrectionDeg).toBeCloseTo(19.47, 2); // engineering.md §10: asin(4/12) = 19.47°
    expect(w.headingDeg).toBeCloseTo(19.47, 2); // heading into the wind, to the right of the course
    expect(w.groundSpeedMps).toBeCloseTo(11.314, 3); // engineering.md §10: 12·cos(19.47°) = 11.314 m/s
    expect(reachWithWind(90, 4, 0) / 1000).toBeCloseTo(10.86, 2); // engineering.md §10: 10.86 km
  });
  it('when the crosswind reaches the airspeed, or the wind is above the limit, or a headwind beats the airspeed, then the leg is not flyable', () => {
    expect(windTriangle({ airspeedMps: 12, windSpeedMps: 12, windFromDeg: 90, courseDeg: 0 }).flyable).toBe(false); // |W·sin| ≥ V (engineering.md §10)
    expect(windTriangle({ airspeedMps: 12, windSpeedMps: 13, windFromDeg: 0, courseDeg: 0, windLimitMps: 12 }).reason).toMatch(/wind limit/); // above the airframe's limit
    expect(windTriangle({ airspeedMps: 12, windSpeedMps: 13, windFromDeg: 0, courseDeg: 0 }).flyable).toBe(false); // GS = 12 − 13 < 0, direct computation
    expect(windTriangle({ airspeedMps: 12, windSpeedMps: 11.9, windFromDeg: 90, courseDeg: 0 }).flyable).toBe(true);
    expect(maxGroundSpeedMps(12, 4)).toBe(16); // direct computation
  });
});

describe('leg energy (engineering.md §10)', () => {
  it('when 7.68 km into a 4 m/s headwind, then the leg uses exactly the 80 Wh above the reserve', () => {
    const e = legEnergy({ distanceM: 7_680, groundSpeedMps: 8, cruisePowerW: 300 });
    expect(e.durationS).toBeCloseTo(960, 9); // 7680 m / 8 m/s, direct computation
    expect(e.energyWh).toBeCloseTo(80, 9); // 300 W × 960 s = 80 Wh, engineering.md §10
    expect(legEnergy({ distanceM: 1000, groundSpeedMps: 10, cruisePowerW: 360, perchManoeuvreWh: 2 }).energyWh).toBeCloseTo(12, 9); // 360 W·100 s = 10 Wh + 2 Wh manoeuvre, direct computation
  });
  it('when a geodesic leg is evaluated, then its course and distance are GeographicLib’s (Flinders Peak → Buninyong)', () => {
    const from = { lat: dmsToDeg(-37, 57, 3.7203), lon: dmsToDeg(144, 25, 29.5244) };
    const to = { lat: dmsToDeg(-37, 39, 10.1561), lon: dmsToDeg(143, 55, 35.3839) };
    const big: MissionDrone = { ...drone, batteryWh: 10_000 };
    const leg = evaluateLeg(from, to, 100, false, big, CALM);
    expect(Math.abs(leg.distanceM - 54_972.271)).toBeLessThanOrEqual(0.001); // Geoscience Australia published example, 1 mm
    expect(Math.abs(leg.courseDeg - dmsToDeg(306, 52, 5.37)) * 3600).toBeLessThan(0.01); // Geoscience Australia published example
    expect(leg.ok).toBe(true);
    expect(evaluateLeg(from, to, 100, false, drone, CALM).failure).toBe('energy'); // 55 km is beyond an 11.52 km reach
  });
});

describe('recharge dwell over the hourly load profile (engineering.md §8 and §10)', () => {
  const flat = (w: number) => Array.from({ length: 24 }, () => w);
  it('when 80 Wh at 75.9 W and η 0.95, then the dwell is 3 994 s', () => {
    const d = dwellS({ arriveAtMs: Date.UTC(2026, 5, 1, 10), utcOffsetMin: 0, hourlyHarvestW: flat(75.9), chargeEfficiency: 0.95, energyWh: 80 });
    expect(d.dwellS).toBeCloseTo((80 * 3600) / (75.9 * 0.95), 6); // engineering.md §10: 3 994 s ≈ 66.6 min
    expect(Math.round(d.dwellS)).toBe(3994);
  });
  it('when the dwell crosses an hour boundary, then each hour charges at its own harvest', () => {
    // Arrive 10:30 local (UTC+10): 30 min at 40 W, then 60 W from 11:00; η = 1 for clear arithmetic.
    const hw = flat(0);
    hw[10] = 40;
    hw[11] = 60;
    const arrive = Date.parse('2026-06-01T10:30:00+10:00');
    const d = dwellS({ arriveAtMs: arrive, utcOffsetMin: 600, hourlyHarvestW: hw, chargeEfficiency: 1, energyWh: 50 });
    // 0.5 h × 40 W = 20 Wh, then 30 Wh at 60 W = 0.5 h: 3 600 s in all (direct computation)
    expect(d.dwellS).toBeCloseTo(3600, 6);
    expect(d.harvestAtArrivalW).toBe(40);
    expect(localHour(arrive, 600)).toBe(10);
  });
  it('when the harvest is zero until the next day, then the dwell waits through the dark hours, and a perch that never harvests never charges', () => {
    const hw = flat(0);
    hw[2] = 100;
    const arrive = Date.parse('2026-06-01T03:00:00Z');
    const d = dwellS({ arriveAtMs: arrive, utcOffsetMin: 0, hourlyHarvestW: hw, chargeEfficiency: 1, energyWh: 150 });
    // 23 h to 02:00, 1 h → 100 Wh, then 22 h more to the next 02:00 and 0.5 h → 50 Wh: 46.5 h (direct computation)
    expect(d.dwellS / 3600).toBeCloseTo(23 + 1 + 23 + 0.5, 6);
    expect(dwellS({ arriveAtMs: arrive, utcOffsetMin: 0, hourlyHarvestW: flat(0), chargeEfficiency: 1, energyWh: 1 }).dwellS).toBe(Number.POSITIVE_INFINITY);
    expect(dwellS({ arriveAtMs: arrive, utcOffsetMin: 0, hourlyHarvestW: flat(10), chargeEfficiency: 1, energyWh: 0 }).dwellS).toBe(0);
  });
  it('when arriving later, then the drone never leaves earlier (first in, first out)', () => {
    const hw = Array.from({ length: 24 }, (_, h) => 20 + 60 * Math.exp(-((h - 13) ** 2) / 18));
    let lastDepart = -Infinity;
    for (let m = 0; m < 48 * 60; m += 7) {
      const at = Date.UTC(2026, 0, 1) + m * 60_000;
      const depart = at + dwellS({ arriveAtMs: at, utcOffsetMin: -300, hourlyHarvestW: hw, chargeEfficiency: 0.95, energyWh: 70 }).dwellS * 1000;
      expect(depart).toBeGreaterThanOrEqual(lastDepart - 1e-6); // harvest ≥ 0, so the departure is monotone (direct computation)
      lastDepart = depart;
    }
  });
});

describe('conductor height at the perch point (parabolic sag, engineering.md §6 and §10)', () => {
  it('when at mid-span, then the chord height less the full sag; at a structure, its attachment height', () => {
    const p = { fromHeightM: 20, toHeightM: 24, spanLengthM: 300, midSpanSagM: 6 };
    expect(conductorHeightAtM({ ...p, xM: 150 })).toBeCloseTo(22 - 6, 9); // sag(S/2) = D, direct computation
    expect(conductorHeightAtM({ ...p, xM: 0 })).toBeCloseTo(20, 9);
    expect(conductorHeightAtM({ ...p, xM: 75 })).toBeCloseTo(21 - (4 * 6 * 75 * 225) / 300 ** 2, 9); // 4·D·x·(S−x)/S² = 4.5 m
  });
});
