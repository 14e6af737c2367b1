// Split-core current-transformer energy harvester: magnetic-circuit model with a saturation bound, SI units.
import { MU0_H_PER_M } from './ampere.ts';

/** Core and winding of a clamp-on harvester, in the calculator's units. */
export interface HarvesterCore {
  turns: number;
  coreAreaMm2: number;
  pathLengthMm: number;
  relativePermeability: number;
  /** Total air gap of the magnetic path (both cut faces together), mm. */
  airGapMm: number;
  saturationT: number;
  windingResistanceOhm?: number;
}

export interface HarvestInput {
  currentA: number;
  frequencyHz: number;
  harvester: HarvesterCore;
  loadOhm?: number;
}

export interface HarvestResult {
  powerW: number;
  optimalLoadOhm: number;
  loadVoltageRmsV: number;
  peakFluxDensityT: number;
  saturated: boolean;
}

/** 2π/√2 ≈ 4.44: the transformer EMF constant for sinusoidal flux. */
const EMF_CONSTANT = (2 * Math.PI) / Math.SQRT2;

// Magnetic-circuit reluctance length l_e/μr + l_g (m); the permeance is μ0·A_e divided by it.
export function effectiveMagneticLengthM(core: Pick<HarvesterCore, 'pathLengthMm' | 'relativePermeability' | 'airGapMm'>): number {
  return core.pathLengthMm / 1000 / core.relativePermeability + core.airGapMm / 1000;
}

// Magnetic-circuit inductance with a gap, L_m = μ0·N²·A_e/(l_e/μr + l_g) (standard magnetic-circuit theory).
export function magnetisingInductanceH(core: Pick<HarvesterCore, 'turns' | 'coreAreaMm2' | 'pathLengthMm' | 'relativePermeability' | 'airGapMm'>): number {
  return (MU0_H_PER_M * core.turns ** 2 * (core.coreAreaMm2 * 1e-6)) / effectiveMagneticLengthM(core);
}

// Magnetising reactance X = ω·L_m (circuit theory).
export function magnetisingReactanceOhm(core: HarvesterCore, frequencyHz: number): number {
  return 2 * Math.PI * frequencyHz * magnetisingInductanceH(core);
}

// CT harvester circuit (current source Iₚ/N ∥ jX into R_w + R_L): P_L = (Iₚ/N)²·R_L·X²/((R_L+R_w)² + X²).
export function linearLoadPowerW(currentA: number, frequencyHz: number, core: HarvesterCore, loadOhm: number): number {
  const x = magnetisingReactanceOhm(core, frequencyHz);
  const rw = core.windingResistanceOhm ?? 0;
  const is = currentA / core.turns;
  return (is ** 2 * loadOhm * x ** 2) / ((loadOhm + rw) ** 2 + x ** 2);
}

// CT harvester maximum-power load, R_opt = √(R_w² + X²) (circuit theory).
export function optimalLoadOhm(core: HarvesterCore, frequencyHz: number): number {
  const x = magnetisingReactanceOhm(core, frequencyHz);
  const rw = core.windingResistanceOhm ?? 0;
  return Math.hypot(rw, x);
}

// Transformer EMF equation: the largest rms magnetising voltage before saturation, V = 4.44·f·N·A_e·B_sat.
export function saturationVoltageRmsV(core: HarvesterCore, frequencyHz: number): number {
  return EMF_CONSTANT * frequencyHz * core.turns * (core.coreAreaMm2 * 1e-6) * core.saturationT;
}

// Faraday's law for sinusoidal flux: B_pk = √2·V_m/(ω·N·A_e), V_m the rms voltage across the magnetising branch.
export function peakFluxDensityT(core: HarvesterCore, frequencyHz: number, magnetisingVoltageRmsV: number): number {
  return (Math.SQRT2 * magnetisingVoltageRmsV) / (2 * Math.PI * frequencyHz * core.turns * (core.coreAreaMm2 * 1e-6));
}

// Linear (unsaturated) rms voltage across the magnetising branch, |I_L|·(R_L + R_w) (circuit theory).
function linearMagnetisingVoltageRmsV(secondaryCurrentA: number, x: number, rw: number, loadOhm: number): number {
  const s = loadOhm + rw;
  return (secondaryCurrentA * x * s) / Math.hypot(s, x);
}

interface OperatingPoint {
  powerW: number;
  loadVoltageRmsV: number;
  magnetisingVoltageRmsV: number;
  saturated: boolean;
}

// Operating point at a given load: the linear response, clamped to the saturation voltage where it would exceed it.
function operatingPoint(currentA: number, frequencyHz: number, core: HarvesterCore, loadOhm: number): OperatingPoint {
  const x = magnetisingReactanceOhm(core, frequencyHz);
  const rw = core.windingResistanceOhm ?? 0;
  const vSat = saturationVoltageRmsV(core, frequencyHz);
  const vLin = linearMagnetisingVoltageRmsV(currentA / core.turns, x, rw, loadOhm);
  const saturated = vLin > vSat;
  const vm = saturated ? vSat : vLin;
  const loadVoltageRmsV = (vm * loadOhm) / (loadOhm + rw);
  return { powerW: loadOhm > 0 ? loadVoltageRmsV ** 2 / loadOhm : 0, loadVoltageRmsV, magnetisingVoltageRmsV: vm, saturated };
}

// Load maximising power under the saturation bound. Linear branch rises up to R_opt; once clamped,
// P = V_sat²·R/(R+R_w)² falls for R > R_w, so the optimum is where V_lin(R) = V_sat (solved in closed form), or R_w if larger.
export function saturatedOptimalLoadOhm(currentA: number, frequencyHz: number, core: HarvesterCore): number {
  const x = magnetisingReactanceOhm(core, frequencyHz);
  const rw = core.windingResistanceOhm ?? 0;
  const vSat = saturationVoltageRmsV(core, frequencyHz);
  const a = (currentA / core.turns) * x; // V_lin as R → ∞
  if (a <= vSat) return Math.hypot(rw, x); // never saturates
  const s = (vSat * x) / Math.sqrt(a ** 2 - vSat ** 2); // R + R_w where V_lin = V_sat
  return Math.max(s - rw, rw);
}

// CT harvester calculator: power, voltage and flux at loadOhm, or at the maximum-power load when loadOhm is omitted.
export function harvest(input: HarvestInput): HarvestResult {
  const { currentA, frequencyHz, harvester: core } = input;
  if (!(core.turns > 0) || !(core.coreAreaMm2 > 0) || !(frequencyHz > 0)) {
    throw new RangeError('turns, coreAreaMm2 and frequencyHz must be positive');
  }
  const current = Math.abs(currentA);
  const rOpt = optimalLoadOhm(core, frequencyHz);
  const bestLoad = operatingPoint(current, frequencyHz, core, rOpt).saturated
    ? saturatedOptimalLoadOhm(current, frequencyHz, core)
    : rOpt;
  const load = input.loadOhm ?? bestLoad;
  const op = operatingPoint(current, frequencyHz, core, load);
  // At the saturated optimum the linear voltage meets the bound exactly (up to rounding): the core is at B_sat.
  const vSat = saturationVoltageRmsV(core, frequencyHz);
  const saturated = op.saturated || (current > 0 && op.magnetisingVoltageRmsV >= vSat * (1 - 1e-9));
  return {
    powerW: op.powerW,
    optimalLoadOhm: bestLoad,
    loadVoltageRmsV: op.loadVoltageRmsV,
    peakFluxDensityT: peakFluxDensityT(core, frequencyHz, op.magnetisingVoltageRmsV),
    saturated,
  };
}

// Line current at which the core just reaches B_sat at R_opt (linear model): above it power grows ∝ I, below ∝ I².
export function saturationOnsetCurrentA(core: HarvesterCore, frequencyHz: number): number {
  const x = magnetisingReactanceOhm(core, frequencyHz);
  const rw = core.windingResistanceOhm ?? 0;
  const rOpt = Math.hypot(rw, x);
  const vAtUnitCurrent = linearMagnetisingVoltageRmsV(1 / core.turns, x, rw, rOpt);
  return saturationVoltageRmsV(core, frequencyHz) / vAtUnitCurrent;
}

/** A harvester product: its core plus the converter and mechanical limits. */
export interface HarvesterProfile extends HarvesterCore {
  id: string;
  name: string;
  coreMaterial: 'si-steel' | 'nanocrystalline' | 'ferrite';
  /** DC-DC / charger efficiency, 0..1. */
  converterEfficiency: number;
  massKg: number;
  gripperMinDiameterMm: number;
  gripperMaxDiameterMm: number;
  contactTempLimitC: number;
  usefulMinHarvestW: number;
}

// Harvested electrical power delivered by the converter, assuming it tracks the maximum-power load (CT harvester model × η_conv).
export function harvestPowerW(profile: HarvesterCore & { converterEfficiency: number }, currentA: number, frequencyHz: number): number {
  return harvest({ currentA, frequencyHz, harvester: profile }).powerW * profile.converterEfficiency;
}

export interface HarvestCurvePoint {
  currentA: number;
  powerW: number;
  saturated: boolean;
}

export interface HarvestCurve {
  points: HarvestCurvePoint[];
  saturationOnsetA: number;
}

// Converter output power versus line current from 0 to maxCurrentA (for charts), with the current where saturation begins.
export function harvestCurve(profile: HarvesterCore & { converterEfficiency: number }, frequencyHz: number, maxCurrentA: number, steps = 50): HarvestCurve {
  const points: HarvestCurvePoint[] = [];
  for (let i = 0; i <= steps; i++) {
    const currentA = (maxCurrentA * i) / steps;
    const r = harvest({ currentA, frequencyHz, harvester: profile });
    points.push({ currentA, powerW: r.powerW * profile.converterEfficiency, saturated: r.saturated });
  }
  return { points, saturationOnsetA: saturationOnsetCurrentA(profile, frequencyHz) };
}
