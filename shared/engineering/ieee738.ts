// Steady-state conductor heat balance per IEEE Std 738-2012 (SI form), qc + qr = qs + I²·R(T).

export type Atmosphere = 'clear' | 'industrial';

export interface ThermalConductor {
  diameterMm: number;
  /** AC resistance at tempLowC, Ω/m. */
  resistanceLowOhmPerM: number;
  tempLowC: number;
  /** AC resistance at tempHighC, Ω/m. */
  resistanceHighOhmPerM: number;
  tempHighC: number;
  emissivity: number;
  absorptivity: number;
}

export interface ThermalWeather {
  ambientC: number;
  windSpeedMps: number;
  /** Angle between wind and conductor axis, degrees (90 = perpendicular). */
  windAngleDeg: number;
  elevationM: number;
  latitudeDeg: number;
  /** Line azimuth, degrees clockwise from north (0 = N–S line, 90 = E–W line). */
  lineAzimuthDeg: number;
  dayOfYear: number;
  /** Local solar time, hours 0–24. */
  solarHour: number;
  atmosphere: Atmosphere;
}

export interface HeatTerms {
  convectionWPerM: number;
  radiationWPerM: number;
  solarWPerM: number;
}

const DEG = Math.PI / 180;

// IEEE Std 738-2012 eq. for air properties at film temperature T_film = (Ts + Ta)/2.
export function filmTemperatureC(surfaceC: number, ambientC: number): number {
  return (surfaceC + ambientC) / 2;
}

// IEEE Std 738-2012 dynamic viscosity of air, μf = 1.458e-6·(T+273)^1.5/(T+383.4), Pa·s.
export function airDynamicViscosityPaS(filmC: number): number {
  return (1.458e-6 * Math.pow(filmC + 273, 1.5)) / (filmC + 383.4);
}

// IEEE Std 738-2012 air density with elevation, ρf = (1.293 − 1.525e-4·He + 6.379e-9·He²)/(1 + 0.00367·T), kg/m³.
export function airDensityKgPerM3(filmC: number, elevationM: number): number {
  return (1.293 - 1.525e-4 * elevationM + 6.379e-9 * elevationM ** 2) / (1 + 0.00367 * filmC);
}

// IEEE Std 738-2012 thermal conductivity of air, kf = 2.424e-2 + 7.477e-5·T − 4.407e-9·T², W/(m·°C).
export function airThermalConductivityWPerMC(filmC: number): number {
  return 2.424e-2 + 7.477e-5 * filmC - 4.407e-9 * filmC ** 2;
}

// IEEE Std 738-2012 wind direction factor, K_angle = 1.194 − cos φ + 0.194·cos 2φ + 0.368·sin 2φ (φ from conductor axis).
export function windDirectionFactor(windAngleDeg: number): number {
  const phi = windAngleDeg * DEG;
  return 1.194 - Math.cos(phi) + 0.194 * Math.cos(2 * phi) + 0.368 * Math.sin(2 * phi);
}

// IEEE Std 738-2012 Reynolds number N_Re = D·ρf·Vw/μf.
export function reynoldsNumber(diameterM: number, densityKgPerM3: number, windSpeedMps: number, viscosityPaS: number): number {
  return (diameterM * densityKgPerM3 * windSpeedMps) / viscosityPaS;
}

export interface ConvectionTerms {
  forcedLowWPerM: number;
  forcedHighWPerM: number;
  naturalWPerM: number;
  /** The largest of the three, per the standard. */
  convectionWPerM: number;
}

// IEEE Std 738-2012 convective cooling: qc1, qc2 (forced) and qcn (natural); the largest governs.
export function convectionTerms(diameterMm: number, surfaceC: number, weather: Pick<ThermalWeather, 'ambientC' | 'windSpeedMps' | 'windAngleDeg' | 'elevationM'>): ConvectionTerms {
  const diameterM = diameterMm / 1000;
  const filmC = filmTemperatureC(surfaceC, weather.ambientC);
  const rho = airDensityKgPerM3(filmC, weather.elevationM);
  const mu = airDynamicViscosityPaS(filmC);
  const kf = airThermalConductivityWPerMC(filmC);
  const dT = Math.max(0, surfaceC - weather.ambientC);
  const nRe = reynoldsNumber(diameterM, rho, Math.max(0, weather.windSpeedMps), mu);
  const kAngle = windDirectionFactor(weather.windAngleDeg);
  const forcedLowWPerM = kAngle * (1.01 + 1.35 * Math.pow(nRe, 0.52)) * kf * dT;
  const forcedHighWPerM = kAngle * 0.754 * Math.pow(nRe, 0.6) * kf * dT;
  const naturalWPerM = 3.645 * Math.sqrt(rho) * Math.pow(diameterM, 0.75) * Math.pow(dT, 1.25);
  return {
    forcedLowWPerM,
    forcedHighWPerM,
    naturalWPerM,
    convectionWPerM: Math.max(forcedLowWPerM, forcedHighWPerM, naturalWPerM),
  };
}

// IEEE Std 738-2012 radiated heat loss, qr = 17.8·D·ε·[((Ts+273)/100)⁴ − ((Ta+273)/100)⁴].
export function radiationWPerM(diameterMm: number, emissivity: number, surfaceC: number, ambientC: number): number {
  const d = diameterMm / 1000;
  return 17.8 * d * emissivity * (((surfaceC + 273) / 100) ** 4 - ((ambientC + 273) / 100) ** 4);
}

// IEEE Std 738-2012 solar declination, δ = 23.46·sin((284 + N)/365·360°), degrees.
export function solarDeclinationDeg(dayOfYear: number): number {
  return 23.46 * Math.sin((((284 + dayOfYear) / 365) * 360) * DEG);
}

// IEEE Std 738-2012 hour angle, ω = 15°·(solar hour − 12); negative before noon.
export function hourAngleDeg(solarHour: number): number {
  return (solarHour - 12) * 15;
}

// IEEE Std 738-2012 solar altitude, Hc = asin(cos Lat·cos δ·cos ω + sin Lat·sin δ), degrees.
export function solarAltitudeDeg(latitudeDeg: number, dayOfYear: number, solarHour: number): number {
  const lat = latitudeDeg * DEG;
  const dec = solarDeclinationDeg(dayOfYear) * DEG;
  const w = hourAngleDeg(solarHour) * DEG;
  const s = Math.cos(lat) * Math.cos(dec) * Math.cos(w) + Math.sin(lat) * Math.sin(dec);
  return Math.asin(Math.max(-1, Math.min(1, s))) / DEG;
}

// IEEE Std 738-2012 solar azimuth variable χ = sin ω / (sin Lat·cos ω − cos Lat·tan δ).
export function solarAzimuthVariable(latitudeDeg: number, dayOfYear: number, solarHour: number): number {
  const lat = latitudeDeg * DEG;
  const dec = solarDeclinationDeg(dayOfYear) * DEG;
  const w = hourAngleDeg(solarHour) * DEG;
  return Math.sin(w) / (Math.sin(lat) * Math.cos(w) - Math.cos(lat) * Math.tan(dec));
}

// IEEE Std 738-2012 solar azimuth constant C (0, 180 or 360°) from the signs of ω and χ.
export function solarAzimuthConstantDeg(hourAngle: number, chi: number): number {
  if (hourAngle < 0) return chi >= 0 ? 0 : 180;
  return chi >= 0 ? 180 : 360;
}

// IEEE Std 738-2012 solar azimuth, Zc = C + atan(χ), degrees clockwise from north.
export function solarAzimuthDeg(latitudeDeg: number, dayOfYear: number, solarHour: number): number {
  const chi = solarAzimuthVariable(latitudeDeg, dayOfYear, solarHour);
  return solarAzimuthConstantDeg(hourAngleDeg(solarHour), chi) + Math.atan(chi) / DEG;
}

const CLEAR_QS = [-42.2391, 63.8044, -1.922, 3.46921e-2, -3.61118e-4, 1.94318e-6, -4.07608e-9];
const INDUSTRIAL_QS = [53.1821, 14.211, 6.6138e-1, -3.1658e-2, 5.4654e-4, -4.3446e-6, 1.3236e-8];

// IEEE Std 738-2012 total solar and sky heat flux at sea level, Qs = Σ aₖ·Hcᵏ (SI polynomial, W/m²).
export function solarFluxSeaLevelWPerM2(altitudeDeg: number, atmosphere: Atmosphere): number {
  if (altitudeDeg <= 0) return 0;
  const c = atmosphere === 'industrial' ? INDUSTRIAL_QS : CLEAR_QS;
  let q = 0;
  for (let k = c.length - 1; k >= 0; k--) q = q * altitudeDeg + c[k]!;
  return Math.max(0, q);
}

// IEEE Std 738-2012 elevation correction, K_solar = 1 + 1.148e-4·He − 1.108e-8·He².
export function solarElevationFactor(elevationM: number): number {
  return 1 + 1.148e-4 * elevationM - 1.108e-8 * elevationM ** 2;
}

// IEEE Std 738-2012 effective angle of incidence, θ = acos(cos Hc·cos(Zc − Zl)), degrees.
export function solarIncidenceDeg(altitudeDeg: number, solarAzimuth: number, lineAzimuthDeg: number): number {
  const c = Math.cos(altitudeDeg * DEG) * Math.cos((solarAzimuth - lineAzimuthDeg) * DEG);
  return Math.acos(Math.max(-1, Math.min(1, c))) / DEG;
}

// IEEE Std 738-2012 solar heat gain, qs = α·Qse·sin θ·D; zero with the sun below the horizon.
export function solarHeatWPerM(diameterMm: number, absorptivity: number, weather: ThermalWeather): number {
  const hc = solarAltitudeDeg(weather.latitudeDeg, weather.dayOfYear, weather.solarHour);
  if (hc <= 0) return 0;
  const zc = solarAzimuthDeg(weather.latitudeDeg, weather.dayOfYear, weather.solarHour);
  const theta = solarIncidenceDeg(hc, zc, weather.lineAzimuthDeg);
  const qse = solarElevationFactor(weather.elevationM) * solarFluxSeaLevelWPerM2(hc, weather.atmosphere);
  return absorptivity * qse * Math.sin(theta * DEG) * (diameterMm / 1000);
}

// IEEE Std 738-2012 resistance at temperature by linear interpolation between two tabulated values.
export function resistanceAtOhmPerM(conductor: Pick<ThermalConductor, 'resistanceLowOhmPerM' | 'tempLowC' | 'resistanceHighOhmPerM' | 'tempHighC'>, tempC: number): number {
  const slope = (conductor.resistanceHighOhmPerM - conductor.resistanceLowOhmPerM) / (conductor.tempHighC - conductor.tempLowC);
  return conductor.resistanceLowOhmPerM + slope * (tempC - conductor.tempLowC);
}

// IEEE Std 738-2012 heat terms (qc, qr, qs) at a conductor surface temperature.
export function heatTermsAt(conductor: ThermalConductor, weather: ThermalWeather, surfaceC: number): HeatTerms {
  return {
    convectionWPerM: convectionTerms(conductor.diameterMm, surfaceC, weather).convectionWPerM,
    radiationWPerM: radiationWPerM(conductor.diameterMm, conductor.emissivity, surfaceC, weather.ambientC),
    solarWPerM: solarHeatWPerM(conductor.diameterMm, conductor.absorptivity, weather),
  };
}

// IEEE Std 738-2012 steady-state thermal rating, I = √((qc + qr − qs)/R(Tmax)); 0 if the sun alone heats past Tmax.
export function ampacityA(conductor: ThermalConductor, weather: ThermalWeather, maxConductorC: number): number {
  const h = heatTermsAt(conductor, weather, maxConductorC);
  const net = h.convectionWPerM + h.radiationWPerM - h.solarWPerM;
  if (net <= 0) return 0;
  return Math.sqrt(net / resistanceAtOhmPerM(conductor, maxConductorC));
}

// IEEE Std 738-2012 steady-state conductor temperature at a current, solving the heat balance by bisection.
export function conductorTempC(conductor: ThermalConductor, weather: ThermalWeather, currentA: number): number {
  const imbalance = (t: number) => {
    const h = heatTermsAt(conductor, weather, t);
    return h.solarWPerM + currentA ** 2 * resistanceAtOhmPerM(conductor, t) - h.convectionWPerM - h.radiationWPerM;
  };
  // Heat gain exceeds loss at ambient (solar, I²R ≥ 0) and loss grows faster than gain well above it.
  let lo = weather.ambientC;
  let hi = weather.ambientC + 50;
  while (imbalance(hi) > 0 && hi < weather.ambientC + 2000) hi += 100;
  for (let i = 0; i < 100 && hi - lo > 1e-9; i++) {
    const mid = (lo + hi) / 2;
    if (imbalance(mid) > 0) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

export interface ConductorThermalInput {
  conductor: ThermalConductor;
  weather: ThermalWeather;
  currentA?: number;
  maxConductorC?: number;
}

export interface ConductorThermalResult {
  ampacityA?: number;
  conductorTempC?: number;
  heat: HeatTerms;
}

// IEEE Std 738-2012 calculator: ampacity at maxConductorC and/or temperature at currentA; heat at maxConductorC if given, else at the solved temperature.
export function conductorThermal(input: ConductorThermalInput): ConductorThermalResult {
  const { conductor, weather, currentA, maxConductorC } = input;
  if (currentA === undefined && maxConductorC === undefined) {
    throw new RangeError('give currentA, maxConductorC or both');
  }
  const result: ConductorThermalResult = { heat: { convectionWPerM: 0, radiationWPerM: 0, solarWPerM: 0 } };
  if (maxConductorC !== undefined) result.ampacityA = ampacityA(conductor, weather, maxConductorC);
  if (currentA !== undefined) result.conductorTempC = conductorTempC(conductor, weather, currentA);
  result.heat = heatTermsAt(conductor, weather, maxConductorC ?? result.conductorTempC!);
  return result;
}
