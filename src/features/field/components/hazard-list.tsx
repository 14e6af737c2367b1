// Hazards on the span, added one by one: kind from the safety catalogue, severity, position along the span, note.
import { useFieldArray, type UseFormReturn } from 'react-hook-form';
import { HAZARD_SEVERITIES, type HazardKind } from '#shared/schemas/inventory.ts';
import { unitLabel, type UnitSystem } from '#shared/units.ts';
import type { SpanFormValues } from '../form-values.ts';
import { Field, QuantityField, Segmented, SelectField } from './form-bits.tsx';

const SEVERITY_LABELS = { low: 'Low', medium: 'Medium', high: 'High' } as const;

export function HazardList({ form, kinds, unitSystem }: { form: UseFormReturn<SpanFormValues>; kinds: HazardKind[]; unitSystem: UnitSystem }) {
  const { control, register, setValue, formState, watch } = form;
  const { fields, append, remove } = useFieldArray({ control, name: 'hazards' });
  const active = kinds.filter((k) => k.active);
  const lengthUnit = unitLabel('length', unitSystem);
  return (
    <div className="space-y-4">
      {fields.length === 0 && <p className="text-ink-700">No hazards recorded on this span.</p>}
      <ol className="space-y-4">
        {fields.map((f, i) => {
          const e = formState.errors.hazards?.[i];
          const kindId = watch(`hazards.${i}.kindId`);
          // Picking a kind proposes its catalogue severity; the surveyor can still change it.
          const proposeSeverity = (value: string) => {
            const k = kinds.find((x) => x.id === value);
            if (k) setValue(`hazards.${i}.severity`, k.defaultSeverity);
          };
          return (
            <li key={f.id} className="space-y-3 rounded-xl border border-ink-200 p-3" aria-label={`Hazard ${i + 1}`}>
              <div className="flex items-center justify-between">
                <h3 className="font-bold">Hazard {i + 1}</h3>
                <button type="button" className="btn-ghost min-h-12 text-alarm" onClick={() => remove(i)}>
                  Remove hazard {i + 1}
                </button>
              </div>
              <Field id={`hazard-${i}-kind`} label="Kind" error={e?.kindId?.message}>
                <SelectField control={control} name={`hazards.${i}.kindId`} id={`hazard-${i}-kind`} onValueChange={proposeSeverity} invalid={!!e?.kindId}>
                  <option value="">{kindId && !kinds.some((k) => k.id === kindId) ? 'Loading the catalogue…' : 'Choose a kind'}</option>
                  {/* A kind retired from the catalogue stays visible on spans that already have it. */}
                  {kinds.filter((k) => k.active || k.id === kindId).map((k) => (
                    <option key={k.id} value={k.id}>{k.label}{k.active ? '' : ' (retired)'}</option>
                  ))}
                </SelectField>
              </Field>
              <Segmented
                name={`hazard-${i}-severity`}
                legend="Severity"
                options={HAZARD_SEVERITIES.map((s) => ({ value: s, label: SEVERITY_LABELS[s] }))}
                registration={register(`hazards.${i}.severity`)}
                error={e?.severity?.message}
              />
              <QuantityField
                id={`hazard-${i}-position`}
                label="Position from the from-structure"
                unit={lengthUnit}
                registration={register(`hazards.${i}.positionAlong`)}
                error={e?.positionAlong?.message}
                placeholder="Leave empty if it spans the whole length"
              />
              <Field id={`hazard-${i}-note`} label="Note" error={e?.note?.message}>
                <textarea id={`hazard-${i}-note`} rows={2} className="field-input touch-input" {...register(`hazards.${i}.note`)} />
              </Field>
            </li>
          );
        })}
      </ol>
      <button
        type="button"
        className="btn-ghost min-h-12 w-full border-2 border-dashed"
        onClick={() => append({ kindId: '', severity: active[0]?.defaultSeverity ?? 'medium', positionAlong: '', note: '' })}
      >
        + Add a hazard
      </button>
      {formState.errors.hazards?.root?.message && <p className="field-error">{formState.errors.hazards.root.message}</p>}
      {typeof formState.errors.hazards?.message === 'string' && <p className="field-error">{formState.errors.hazards.message}</p>}
    </div>
  );
}
