// Conductor sag at mid-span for a level span, SI or any consistent units.

// Parabolic sag approximation, D = w·S²/(8·H) (Electric Power Engineering Handbook, sag and tension).
export function parabolicSag(spanLength: number, weightPerLength: number, horizontalTension: number): number {
  if (!(horizontalTension > 0)) throw new RangeError('horizontalTension must be positive');
  return (weightPerLength * spanLength ** 2) / (8 * horizontalTension);
}

// Catenary sag, D = C·(cosh(S/(2C)) − 1) with C = H/w (Electric Power Engineering Handbook, sag and tension).
export function catenarySag(spanLength: number, weightPerLength: number, horizontalTension: number): number {
  if (!(horizontalTension > 0) || !(weightPerLength > 0)) throw new RangeError('tension and weight must be positive');
  const c = horizontalTension / weightPerLength;
  return c * (Math.cosh(spanLength / (2 * c)) - 1);
}

/** Standard gravity, m/s² (CGPM). */
export const STANDARD_GRAVITY_MPS2 = 9.80665;

// Catenary sag in SI: span m, conductor mass kg/m, horizontal tension N → sag m (Electric Power Engineering Handbook).
export function catenarySagM(spanLengthM: number, massKgPerM: number, horizontalTensionN: number): number {
  return catenarySag(spanLengthM, massKgPerM * STANDARD_GRAVITY_MPS2, horizontalTensionN);
}
