import { describe, it, expect } from 'vitest';
import {
  ampacityA,
  conductorTempC,
  conductorThermal,
  convectionTerms,
  heatTermsAt,
  resistanceAtOhmPerM,
  solarAltitudeDeg,
  solarAzimuthDeg,
  solarAzimuthConstantDeg,
  solarHeatWPerM,
  solarFluxSeaLevelWPerM2,
  solarElevationFactor,
  windDirectionFactor,
  airDensityKgPerM3,
  type ThermalConductor,
  type ThermalWeather,
} from '../../../shared/engineering/ieee738.ts';

// IEEE Std 738-2012 sample: Drake 26/7 ACSR, as transcribed by open-source test suites.
const drake: ThermalConductor = {
  diameterMm: 28.14,
  resistanceLowOhmPerM: 7.283e-5,
  tempLowC: 25,
  resistanceHighOhmPerM: 8.688e-5,
  tempHighC: 75,
  emissivity: 0.8,
  absorptivity: 0.8,
};
const sampleWeather: ThermalWeather = {
  ambientC: 40,
  windSpeedMps: 0.61,
  windAngleDeg: 90,
  elevationM: 0,
  latitudeDeg: 30, // solar inputs from memory; they reproduce qs
  lineAzimuthDeg: 90,
  dayOfYear: 161,
  solarHour: 11,
  atmosphere: 'clear',
};

const within = (actual: number, expected: number, relTol: number) =>
  expect(Math.abs(actual - expected) / Math.abs(expected)).toBeLessThanOrEqual(relTol);

describe('IEEE Std 738-2012 heat balance', () => {
  const heat = heatTermsAt(drake, sampleWeather, 100);

  it('when Drake runs at 100 °C, then convection cooling is 81.93 W/m', () => {
    within(heat.convectionWPerM, 81.93, 0.005); // IEEE Std 738-2012 sample (qc), 0.5 %
  });

  it('when Drake runs at 100 °C, then radiated cooling is 39.1 W/m', () => {
    within(heat.radiationWPerM, 39.1, 0.005); // IEEE Std 738-2012 sample (qr), 0.5 %
  });

  it('when the sun is at 11:00 on 10 June at 30° N, then solar heating is 22.44 W/m', () => {
    within(heat.solarWPerM, 22.44, 0.005); // IEEE Std 738-2012 sample (qs), 0.5 %
  });

  it('interpolates R(100 °C) = 9.390e-5 Ω/m from the 25 °C and 75 °C values', () => {
    within(resistanceAtOhmPerM(drake, 100), 9.39e-5, 0.0005); // IEEE Std 738-2012 sample
  });

  it('when the limit is 100 °C, then the ampacity is about 1025 A', () => {
    within(ampacityA(drake, sampleWeather, 100), 1025, 0.005); // IEEE Std 738-2012 sample
  });

  it('when Drake carries its ampacity, then the solved temperature returns to 100 °C', () => {
    const i = ampacityA(drake, sampleWeather, 100);
    expect(conductorTempC(drake, sampleWeather, i)).toBeCloseTo(100, 3); // direct computation (inverse of the rating)
  });

  it('uses forced convection qc1 at low wind, as the sample does', () => {
    const c = convectionTerms(28.14, 100, sampleWeather);
    expect(c.forcedLowWPerM).toBeGreaterThan(c.forcedHighWPerM); // IEEE Std 738-2012 sample (qc1 governs at 0.61 m/s)
    expect(c.convectionWPerM).toBe(c.forcedLowWPerM);
  });

  it('when the air is still, then natural convection governs', () => {
    const c = convectionTerms(28.14, 100, { ...sampleWeather, windSpeedMps: 0 });
    expect(c.forcedLowWPerM).toBeLessThan(c.naturalWPerM); // IEEE Std 738-2012: with N_Re = 0 qc1 is only 1.01·k_f·ΔT
    expect(c.forcedHighWPerM).toBe(0); // direct computation: N_Re = 0 with no wind
    expect(c.convectionWPerM).toBe(c.naturalWPerM);
    within(c.naturalWPerM, 3.645 * Math.sqrt(1.029) * 0.02814 ** 0.75 * 60 ** 1.25, 0.002); // IEEE Std 738-2012 qcn with ρf ≈ 1.029 kg/m³ at 70 °C film (direct computation)
  });

  it('has K_angle = 1 for perpendicular wind and less for parallel wind', () => {
    expect(windDirectionFactor(90)).toBeCloseTo(1.0, 10); // IEEE Std 738-2012 K_angle equation
    expect(windDirectionFactor(0)).toBeCloseTo(0.388, 3); // IEEE Std 738-2012 K_angle equation (1.194 − 1 + 0.194)
  });

  it('reduces air density with elevation', () => {
    expect(airDensityKgPerM3(70, 1000)).toBeLessThan(airDensityKgPerM3(70, 0)); // IEEE Std 738-2012 ρf equation
    within(airDensityKgPerM3(0, 0), 1.293, 1e-9); // IEEE Std 738-2012 ρf equation at 0 °C, sea level
  });

  it('places the 11:00 sun at about 74.9° altitude and 114° azimuth', () => {
    expect(solarAltitudeDeg(30, 161, 11)).toBeCloseTo(74.9, 1); // IEEE Std 738-2012 sample (Hc), from memory
    expect(solarAzimuthDeg(30, 161, 11)).toBeCloseTo(114, 0); // IEEE Std 738-2012 sample (Zc), from memory
  });

  it('chooses the azimuth constant C from the signs of ω and χ', () => {
    expect(solarAzimuthConstantDeg(-15, 1)).toBe(0); // IEEE Std 738-2012 table of C
    expect(solarAzimuthConstantDeg(-15, -1)).toBe(180);
    expect(solarAzimuthConstantDeg(15, 1)).toBe(180);
    expect(solarAzimuthConstantDeg(15, -1)).toBe(360);
  });

  it('gives less flux in an industrial atmosphere at high sun, more at elevation', () => {
    expect(solarFluxSeaLevelWPerM2(74.9, 'industrial')).toBeLessThan(solarFluxSeaLevelWPerM2(74.9, 'clear')); // IEEE Std 738-2012 Qs polynomials
    expect(solarElevationFactor(1500)).toBeGreaterThan(1); // IEEE Std 738-2012 K_solar
  });

  it('when the sun is below the horizon, then there is no solar heating', () => {
    expect(solarHeatWPerM(28.14, 0.8, { ...sampleWeather, solarHour: 1 })).toBe(0); // IEEE Std 738-2012 (Hc ≤ 0)
  });

  it('when the line runs along the noon sun (N–S), then solar heating is less than for an E–W line', () => {
    const noon = { ...sampleWeather, solarHour: 12 };
    expect(solarHeatWPerM(28.14, 0.8, { ...noon, lineAzimuthDeg: 0 })).toBeLessThan(
      solarHeatWPerM(28.14, 0.8, { ...noon, lineAzimuthDeg: 90 }),
    ); // IEEE Std 738-2012 θ equation
  });

  it('when the current rises, then the conductor runs hotter', () => {
    expect(conductorTempC(drake, sampleWeather, 1200)).toBeGreaterThan(conductorTempC(drake, sampleWeather, 600)); // direct computation
  });

  describe('calculator contract', () => {
    it('when maxConductorC is given, then it returns the ampacity and heat at that temperature', () => {
      const r = conductorThermal({ conductor: drake, weather: sampleWeather, maxConductorC: 100 });
      within(r.ampacityA!, 1025, 0.005); // IEEE Std 738-2012 sample
      within(r.heat.radiationWPerM, 39.1, 0.005); // IEEE Std 738-2012 sample
      expect(r.conductorTempC).toBeUndefined();
    });

    it('when only currentA is given, then heat is reported at the solved temperature', () => {
      const r = conductorThermal({ conductor: drake, weather: sampleWeather, currentA: 800 });
      expect(r.ampacityA).toBeUndefined();
      const t = r.conductorTempC!;
      expect(t).toBeGreaterThan(40);
      expect(t).toBeLessThan(100);
      const balance = r.heat.convectionWPerM + r.heat.radiationWPerM - r.heat.solarWPerM - 800 ** 2 * resistanceAtOhmPerM(drake, t);
      expect(Math.abs(balance)).toBeLessThan(1e-4); // IEEE Std 738-2012 heat balance qc + qr = qs + I²R
    });

    it('when neither is given, then it refuses', () => {
      expect(() => conductorThermal({ conductor: drake, weather: sampleWeather })).toThrow(RangeError);
    });
  });
});
