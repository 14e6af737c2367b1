// Conductor: a catalogue code word (the diameter and resistances come with it) or a custom description.
import type { UseFormReturn } from 'react-hook-form';
import { CONDUCTOR_MATERIALS, type ConductorCatalogueEntry } from '#shared/schemas/inventory.ts';
import { formatQuantity, unitLabel, type UnitSystem } from '#shared/units.ts';
import type { SpanFormValues } from '../form-values.ts';
import { Field, QuantityField, Segmented, SelectField } from './form-bits.tsx';

export function ConductorPicker({ form, catalogue, unitSystem }: { form: UseFormReturn<SpanFormValues>; catalogue: ConductorCatalogueEntry[]; unitSystem: UnitSystem }) {
  const { register, watch, formState } = form;
  const mode = watch('conductorMode');
  const codeWord = watch('conductorCodeWord');
  const picked = catalogue.find((c) => c.codeWord === codeWord);
  const errors = formState.errors;
  return (
    <div className="space-y-4">
      <Segmented
        name="conductorMode"
        legend="Conductor from"
        options={[
          { value: 'catalogue', label: 'Catalogue' },
          { value: 'custom', label: 'Custom' },
        ]}
        registration={register('conductorMode')}
      />
      {mode === 'catalogue' ? (
        <Field
          id="conductorCodeWord"
          label="Code word"
          error={errors.conductorCodeWord?.message}
          hint={
            picked ? (
              <span data-testid="conductor-filled">
                {picked.size} {picked.stranding} {picked.material} · diameter {formatQuantity(picked.diameterMm, 'diameter', unitSystem)} (from the catalogue)
              </span>
            ) : undefined
          }
        >
          <SelectField control={form.control} name="conductorCodeWord" id="conductorCodeWord" invalid={!!errors.conductorCodeWord}>
            <option value="">{codeWord && !picked ? 'Loading the catalogue…' : 'Not recorded yet'}</option>
            {catalogue.map((c) => (
              <option key={c.codeWord} value={c.codeWord}>
                {c.codeWord} — {c.size} {c.stranding}
              </option>
            ))}
          </SelectField>
        </Field>
      ) : (
        <div className="grid gap-4 sm:grid-cols-3">
          <Field id="conductorSize" label="Size" error={errors.conductorSize?.message}>
            <input id="conductorSize" className="field-input touch-input" placeholder="e.g. 477 kcmil 26/7" {...register('conductorSize')} />
          </Field>
          <Field id="conductorMaterial" label="Material" error={errors.conductorMaterial?.message}>
            <SelectField control={form.control} name="conductorMaterial" id="conductorMaterial" invalid={!!errors.conductorMaterial}>
              <option value="">Choose</option>
              {CONDUCTOR_MATERIALS.map((m) => (
                <option key={m} value={m}>{m === 'copper' ? 'Copper' : m === 'other' ? 'Other' : m}</option>
              ))}
            </SelectField>
          </Field>
          <QuantityField
            id="conductorDiameter"
            label="Outside diameter"
            unit={unitLabel('diameter', unitSystem)}
            registration={register('conductorDiameter')}
            error={errors.conductorDiameter?.message}
          />
        </div>
      )}
    </div>
  );
}
