// Converting the numbers a surveyor types (in their unit system) to SI for the wire, and back for editing.
import { fromDisplay, toDisplay, unitLabel, type QuantityKind, type UnitSystem } from '#shared/units.ts';

/** Digits kept when an SI value is shown for editing: enough that a round trip does not drift visibly. */
const EDIT_DIGITS: Partial<Record<QuantityKind, Record<UnitSystem, number>>> = {
  length: { metric: 2, us: 2 },
  diameter: { metric: 2, us: 3 },
  current: { metric: 0, us: 0 },
};

/** SI value → the text put in an input, in the user's units (empty for "not recorded"). */
export function siToInput(si: number | null | undefined, kind: QuantityKind, system: UnitSystem): string {
  if (si === null || si === undefined || !Number.isFinite(si)) return '';
  const digits = EDIT_DIGITS[kind]?.[system] ?? 3;
  const shown = toDisplay(si, kind, system);
  return String(Number(shown.toFixed(digits)));
}

/**
 * Text typed in an input → SI number; '' → null (not recorded). A comma decimal separator is accepted
 * (tablets set to many locales offer only a comma). Anything unreadable → NaN so validation names the field.
 */
export function inputToSi(text: string | number | null | undefined, kind: QuantityKind, system: UnitSystem): number | null {
  if (text === null || text === undefined) return null;
  const raw = String(text).trim().replace(',', '.');
  if (raw === '') return null;
  const n = Number(raw);
  if (!Number.isFinite(n)) return Number.NaN;
  return fromDisplay(n, kind, system);
}

export { unitLabel };
