// ACSR conductor catalogue (ASTM B232 constructions, Aluminum Association code words), SI units.

/** Ω per 1000 ft → Ω per metre. */
const OHM_PER_KFT_TO_OHM_PER_M = 1 / 304.8;
/** lb/ft → kg/m. */
const LB_PER_FT_TO_KG_PER_M = 0.45359237 / 0.3048;

export interface ConductorType {
  codeWord: string;
  family: 'ACSR';
  /** AWG or kcmil label as printed in the table, e.g. "795 kcmil". */
  size: string;
  /** Aluminium area in kcmil (4/0 AWG = 211.6 kcmil). */
  sizeKcmil: number;
  /** Aluminium/steel strand counts, e.g. "26/7". */
  stranding: string;
  diameterMm: number;
  resistanceDc20OhmPerM: number;
  resistanceAc25OhmPerM: number;
  resistanceAc75OhmPerM: number;
  /** Linear weight, kg/m, where a source was read; otherwise undefined. */
  weightKgPerM?: number;
  emissivity: number;
  absorptivity: number;
}

/** Emissivity and absorptivity used when the surface state is unknown: 0.5 (common practice). */
export const DEFAULT_EMISSIVITY = 0.5;
export const DEFAULT_ABSORPTIVITY = 0.5;

function acsr(codeWord: string, size: string, sizeKcmil: number, stranding: string, diameterMm: number, rDc20PerKft: number, rAc25PerKft: number, rAc75PerKft: number, weightLbPerFt?: number): ConductorType {
  return {
    codeWord,
    family: 'ACSR',
    size,
    sizeKcmil,
    stranding,
    diameterMm,
    resistanceDc20OhmPerM: rDc20PerKft * OHM_PER_KFT_TO_OHM_PER_M,
    resistanceAc25OhmPerM: rAc25PerKft * OHM_PER_KFT_TO_OHM_PER_M,
    resistanceAc75OhmPerM: rAc75PerKft * OHM_PER_KFT_TO_OHM_PER_M,
    weightKgPerM: weightLbPerFt === undefined ? undefined : weightLbPerFt * LB_PER_FT_TO_KG_PER_M,
    emissivity: DEFAULT_EMISSIVITY,
    absorptivity: DEFAULT_ABSORPTIVITY,
  };
}

// Textbook ACSR table (ASTM B232 constructions): OD and Ω/1000 ft at DC 20 °C, AC 25 °C, AC 75 °C.
// Only Drake's weight (1.094 lb/ft, sag-tension tables) was read from a source; the others are left undefined.
export const ACSR_CONDUCTORS: readonly ConductorType[] = [
  acsr('Penguin', '4/0 AWG', 211.6, '6/1', 14.3, 0.0795, 0.0822, 0.116),
  acsr('Partridge', '266.8 kcmil', 266.8, '26/7', 16.31, 0.0637, 0.0652, 0.0778),
  acsr('Linnet', '336.4 kcmil', 336.4, '26/7', 18.29, 0.0506, 0.0517, 0.0619),
  acsr('Hawk', '477 kcmil', 477, '26/7', 21.79, 0.0357, 0.0366, 0.0438),
  acsr('Dove', '556.5 kcmil', 556.5, '26/7', 23.55, 0.0305, 0.0314, 0.0375),
  acsr('Drake', '795 kcmil', 795, '26/7', 28.14, 0.0214, 0.0222, 0.0263, 1.094),
];

// Catalogue lookup by code word (case-insensitive).
export function findConductor(codeWord: string): ConductorType | undefined {
  const key = codeWord.trim().toLowerCase();
  return ACSR_CONDUCTORS.find((c) => c.codeWord.toLowerCase() === key);
}

// IEEE Std 738-2012 input from a catalogue row: AC resistance at 25 °C and 75 °C.
export function thermalConductorOf(c: ConductorType, surface?: { emissivity?: number; absorptivity?: number }) {
  return {
    diameterMm: c.diameterMm,
    resistanceLowOhmPerM: c.resistanceAc25OhmPerM,
    tempLowC: 25,
    resistanceHighOhmPerM: c.resistanceAc75OhmPerM,
    tempHighC: 75,
    emissivity: surface?.emissivity ?? c.emissivity,
    absorptivity: surface?.absorptivity ?? c.absorptivity,
  };
}
