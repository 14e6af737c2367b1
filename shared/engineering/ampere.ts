// Magnetic flux density around a long straight conductor, SI units throughout.

/** Permeability of free space μ0 = 4π×10⁻⁷ H/m (classical SI value). */
export const MU0_H_PER_M = 4 * Math.PI * 1e-7;

// Ampère's circuital law for an infinite straight wire: B = μ0·I / (2π·r).
export function fluxDensityT(currentA: number, distanceM: number): number {
  if (!(distanceM > 0)) throw new RangeError('distanceM must be positive');
  return (MU0_H_PER_M * currentA) / (2 * Math.PI * distanceM);
}

// Ampère's law: a closed core encloses one sub-conductor of an n-bundle, so it sees I/n.
export function enclosedCurrentA(phaseCurrentA: number, subConductors = 1): number {
  if (!(subConductors >= 1)) throw new RangeError('subConductors must be at least 1');
  return phaseCurrentA / Math.floor(subConductors);
}
