// Line current implied by a measured harvest: the CT harvester model inverted by bisection on its
// monotone power–current curve (the power at the maximum-power load rises with current, saturation included).
import { harvest, saturationVoltageRmsV, type HarvesterCore } from './ct-harvester.ts';

/** The largest line current the inversion searches, A (above any overhead-line rating; common practice). */
export const IMPLIED_CURRENT_MAX_A = 10_000;

export interface ImpliedCurrentCeiling {
  /** The largest power the model gives for any current up to IMPLIED_CURRENT_MAX_A, W. */
  ceilingW: number;
  /** The power the model tends to as the current grows without bound, W (V_sat²/(4·R_w); Infinity when R_w = 0). */
  asymptoteW: number;
}

// Saturated optimum with winding resistance: as I → ∞ the best load tends to R_w, so P → V_sat²·R_w/(2·R_w)² = V_sat²/(4·R_w).
export function impliedCurrentCeiling(harvester: HarvesterCore, frequencyHz: number): ImpliedCurrentCeiling {
  const rw = harvester.windingResistanceOhm ?? 0;
  const vSat = saturationVoltageRmsV(harvester, frequencyHz);
  return {
    // Once the best load reaches R_w the saturated power stops rising: a power on that plateau names no single current.
    ceilingW: harvest({ currentA: IMPLIED_CURRENT_MAX_A, frequencyHz, harvester }).powerW,
    asymptoteW: rw > 0 ? vSat ** 2 / (4 * rw) : Infinity,
  };
}

export class PowerAboveCeilingError extends RangeError {
  constructor(readonly ceilingW: number) {
    super(`the harvester model gives at most ${ceilingW.toFixed(2)} W`);
  }
}

/**
 * The line current (A) at which the harvester, at its maximum-power load, delivers `powerW` (before the converter).
 * Bisection to a relative tolerance of 1e-7 of the current; throws PowerAboveCeilingError at or above the model's ceiling.
 */
export function impliedCurrentA(harvester: HarvesterCore, frequencyHz: number, powerW: number): number {
  if (!(powerW >= 0)) throw new RangeError('powerW must be 0 or more');
  if (powerW === 0) return 0;
  const { ceilingW } = impliedCurrentCeiling(harvester, frequencyHz);
  if (powerW >= ceilingW) throw new PowerAboveCeilingError(ceilingW);
  let lo = 0;
  let hi = IMPLIED_CURRENT_MAX_A;
  for (let i = 0; i < 200 && hi - lo > 1e-7 * Math.max(1, hi); i++) {
    const mid = (lo + hi) / 2;
    if (harvest({ currentA: mid, frequencyHz, harvester }).powerW < powerW) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}
