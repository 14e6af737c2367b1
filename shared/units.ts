// SI ↔ display conversion for the two unit systems the product offers. Values are stored in SI; only the UI converts.

export type UnitSystem = 'metric' | 'us';

/**
 * Quantity kinds and their SI storage unit:
 * length m, diameter mm, temperature °C, power W, current A, voltage kV, speed m/s, mass kg,
 * resistance-per-length Ω/m, conductor-area mm², linear-mass kg/m, energy Wh, duration min.
 */
export type QuantityKind =
  | 'length'
  | 'diameter'
  | 'temperature'
  | 'power'
  | 'current'
  | 'voltage'
  | 'speed'
  | 'mass'
  | 'resistance-per-length'
  | 'conductor-area'
  | 'linear-mass'
  | 'energy'
  | 'duration';

// Exact definitions: international foot and inch (1959), avoirdupois pound.
export const M_PER_FT = 0.3048;
export const MM_PER_IN = 25.4;
export const KG_PER_LB = 0.45359237;
/** 1 kcmil = 1000 circular mils = 1000·(π/4)·(0.0254 mm)² = 0.506707 mm². */
export const MM2_PER_KCMIL = (1000 * Math.PI * 0.0254 ** 2) / 4;
const MPS_PER_MPH = 0.44704;

interface Conversion {
  unit: string;
  toDisplay: (si: number) => number;
  fromDisplay: (display: number) => number;
  digits: number;
}

const same = (unit: string, digits: number): Conversion => ({ unit, toDisplay: (x) => x, fromDisplay: (x) => x, digits });
const scale = (unit: string, factor: number, digits: number): Conversion => ({
  unit,
  toDisplay: (x) => x * factor,
  fromDisplay: (x) => x / factor,
  digits,
});

const TABLE: Record<QuantityKind, Record<UnitSystem, Conversion>> = {
  length: { metric: same('m', 2), us: scale('ft', 1 / M_PER_FT, 1) },
  diameter: { metric: same('mm', 2), us: scale('in', 1 / MM_PER_IN, 3) },
  temperature: {
    metric: same('°C', 1),
    us: { unit: '°F', toDisplay: (c) => (c * 9) / 5 + 32, fromDisplay: (f) => ((f - 32) * 5) / 9, digits: 1 },
  },
  power: { metric: same('W', 1), us: same('W', 1) },
  current: { metric: same('A', 0), us: same('A', 0) },
  voltage: { metric: same('kV', 1), us: same('kV', 1) },
  speed: { metric: same('m/s', 1), us: scale('mph', 1 / MPS_PER_MPH, 1) },
  mass: { metric: same('kg', 2), us: scale('lb', 1 / KG_PER_LB, 2) },
  'resistance-per-length': { metric: scale('Ω/km', 1000, 4), us: scale('Ω/kft', 304.8, 4) },
  'conductor-area': { metric: same('mm²', 1), us: scale('kcmil', 1 / MM2_PER_KCMIL, 1) },
  'linear-mass': { metric: same('kg/m', 3), us: scale('lb/ft', M_PER_FT / KG_PER_LB, 3) },
  energy: { metric: same('Wh', 0), us: same('Wh', 0) },
  duration: { metric: same('min', 0), us: same('min', 0) },
};

// SI value → the number shown in the chosen system.
export function toDisplay(si: number, kind: QuantityKind, system: UnitSystem): number {
  return TABLE[kind][system].toDisplay(si);
}

// Number typed in the chosen system → SI value for storage.
export function fromDisplay(display: number, kind: QuantityKind, system: UnitSystem): number {
  return TABLE[kind][system].fromDisplay(display);
}

export function unitLabel(kind: QuantityKind, system: UnitSystem): string {
  return TABLE[kind][system].unit;
}

// "11.0 ft", "3.35 m", "104.0 °F"; null/undefined/NaN → "—".
export function formatQuantity(
  value: number | null | undefined,
  kind: QuantityKind,
  system: UnitSystem,
  options: { digits?: number } = {},
): string {
  if (value === null || value === undefined || Number.isNaN(value)) return '—';
  const c = TABLE[kind][system];
  if (!Number.isFinite(value)) return `${value > 0 ? '∞' : '−∞'} ${c.unit}`;
  const shown = c.toDisplay(value);
  const digits = options.digits ?? c.digits;
  const text = shown.toLocaleString('en-US', { minimumFractionDigits: digits, maximumFractionDigits: digits });
  return `${text} ${c.unit}`;
}

const AWG_SIZES: ReadonlyArray<[label: string, kcmil: number]> = [
  ['4/0 AWG', 211.6],
  ['3/0 AWG', 167.8],
  ['2/0 AWG', 133.1],
  ['1/0 AWG', 105.6],
  ['1 AWG', 83.69],
  ['2 AWG', 66.36],
  ['4 AWG', 41.74],
  ['6 AWG', 26.24],
];

// Conductor size label: kcmil (or its AWG name below 250 kcmil) in 'us', mm² in 'metric'.
export function conductorSizeLabel(kcmil: number, system: UnitSystem): string {
  if (system === 'metric') return `${(kcmil * MM2_PER_KCMIL).toFixed(1)} mm²`;
  const awg = AWG_SIZES.find(([, k]) => Math.abs(k - kcmil) / k < 0.005);
  if (awg) return awg[0];
  return `${Number.isInteger(kcmil) ? kcmil : kcmil.toFixed(1)} kcmil`;
}
