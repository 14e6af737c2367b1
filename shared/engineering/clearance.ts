// Minimum approach distance and vertical ground clearance for an overhead line, returned in metres.

const FT_TO_M = 0.3048;
const IN_TO_M = 0.0254;

// Phase-to-ground voltage of a balanced three-phase line, V_LG = V_LL/√3.
export function voltageToGroundKv(lineToLineKv: number): number {
  return lineToLineKv / Math.sqrt(3);
}

// OSHA 29 CFR 1910.333(c)(3): 10 ft up to 50 kV to ground, plus 4 in for every 10 kV over 50 kV.
// Rounding: each started 10 kV adds the full 4 in (conservative), so 50.1 kV → 10 ft 4 in.
export function oshaApproachDistanceFt(voltageToGroundKvValue: number): number {
  const overKv = Math.max(0, voltageToGroundKvValue - 50);
  const steps = Math.ceil(overKv / 10 - 1e-9);
  return 10 + (steps * 4) / 12;
}

// OSHA 29 CFR 1910.333(c)(3) approach distance for a line-to-line voltage, metres.
export function approachDistanceM(lineToLineKv: number): number {
  return oshaApproachDistanceFt(voltageToGroundKv(lineToLineKv)) * FT_TO_M;
}

// NESC (ANSI C2) Table 232-1, open supply conductors over roads: 18.5 ft up to 22 kV to ground,
// plus 0.4 in per kV over 22 kV (the adder is recalled, not read from the table).
export function nescGroundClearanceFt(voltageToGroundKvValue: number): number {
  const overKv = Math.max(0, voltageToGroundKvValue - 22);
  return 18.5 + (overKv * 0.4) / 12;
}

// NESC (ANSI C2) Table 232-1 ground clearance for a line-to-line voltage, metres (applies at worst-case sag).
export function codeGroundClearanceM(lineToLineKv: number): number {
  return nescGroundClearanceFt(voltageToGroundKv(lineToLineKv)) * FT_TO_M;
}

export { FT_TO_M, IN_TO_M };
