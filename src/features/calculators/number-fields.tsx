// Numeric form fields shown in the user's units and handed to the shared methods in SI.
import { useState } from 'react';
import { formatQuantity, fromDisplay, toDisplay, unitLabel, type QuantityKind, type UnitSystem } from '#shared/units.ts';

export interface FieldSpec {
  key: string;
  label: string;
  /** Quantity kind for unit conversion; omitted = shown as stored (with `unit`). */
  kind?: QuantityKind;
  unit?: string;
  optional?: boolean;
  step?: string;
  hint?: string;
}

export type FieldValues = Record<string, string>;

const round = (x: number) => String(+x.toPrecision(6));

/** Display strings for SI values. */
export function toFieldValues(specs: FieldSpec[], si: Readonly<Record<string, unknown>>, system: UnitSystem): FieldValues {
  const out: FieldValues = {};
  for (const s of specs) {
    const v = si[s.key];
    out[s.key] = typeof v !== 'number' ? '' : round(s.kind ? toDisplay(v, s.kind, system) : v);
  }
  return out;
}

/** SI numbers from the display strings (blank optional fields left out; text that is not a number stays as text for the schema to reject). */
export function toSi(specs: FieldSpec[], values: FieldValues, system: UnitSystem): Record<string, number | string | undefined> {
  const out: Record<string, number | string | undefined> = {};
  for (const s of specs) {
    const raw = (values[s.key] ?? '').trim();
    if (raw === '') {
      out[s.key] = s.optional ? undefined : raw;
      continue;
    }
    const n = Number(raw.replace(',', '.'));
    out[s.key] = Number.isFinite(n) ? (s.kind ? fromDisplay(n, s.kind, system) : n) : raw;
  }
  return out;
}

export function useFieldValues(specs: FieldSpec[], initialSi: Readonly<Record<string, unknown>>, system: UnitSystem) {
  const [values, setValues] = useState<FieldValues>(() => toFieldValues(specs, initialSi, system));
  return {
    values,
    set: (key: string, v: string) => setValues((old) => ({ ...old, [key]: v })),
    load: (si: Readonly<Record<string, unknown>>) => setValues((old) => ({ ...old, ...toFieldValues(specs.filter((s) => s.key in si), si, system) })),
  };
}

export function NumberFields({
  specs,
  values,
  onChange,
  system,
  issues,
  idPrefix,
}: {
  specs: FieldSpec[];
  values: FieldValues;
  onChange: (key: string, value: string) => void;
  system: UnitSystem;
  issues: Record<string, string | undefined>;
  idPrefix: string;
}) {
  return (
    <div className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-3">
      {specs.map((s) => {
        const id = `${idPrefix}-${s.key}`;
        const unit = s.kind ? unitLabel(s.kind, system) : s.unit;
        const issue = issues[s.key];
        return (
          <div key={s.key}>
            <label htmlFor={id} className="field-label">
              {s.label}
              {unit ? ` (${unit})` : ''}
              {s.optional ? ' — optional' : ''}
            </label>
            <input
              id={id}
              name={s.key}
              inputMode="decimal"
              className="field-input"
              value={values[s.key] ?? ''}
              onChange={(e) => onChange(s.key, e.target.value)}
              aria-invalid={issue ? true : undefined}
              aria-describedby={issue ? `${id}-error` : undefined}
            />
            {s.hint && !issue && <p className="mt-1 text-xs text-ink-700">{s.hint}</p>}
            {issue && (
              <p id={`${id}-error`} className="field-error">
                {issue}
              </p>
            )}
          </div>
        );
      })}
    </div>
  );
}

/** Zod or API issues keyed by the last path segment (the field key). */
export function issuesByField(issues: readonly { path: string | readonly PropertyKey[]; message: string }[]): Record<string, string> {
  const out: Record<string, string> = {};
  for (const i of issues) {
    const path = typeof i.path === 'string' ? i.path.split('.') : i.path.map(String);
    const key = path[path.length - 1] ?? '(body)';
    out[key] ??= i.message;
  }
  return out;
}

export { formatQuantity };
