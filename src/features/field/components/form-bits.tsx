// Small pieces of the tablet form: labelled inputs with a unit and an inline error, and big segmented choices.
import type { ReactNode } from 'react';
import { useController, type Control, type FieldPath, type FieldValues, type UseFormRegisterReturn } from 'react-hook-form';

export function FieldError({ id, message }: { id: string; message?: string }) {
  if (!message) return null;
  return (
    <p id={`${id}-error`} className="field-error" role="alert">
      {message}
    </p>
  );
}

export function Field({ id, label, hint, error, children }: { id: string; label: string; hint?: ReactNode; error?: string; children: ReactNode }) {
  return (
    <div>
      <label className="field-label" htmlFor={id}>
        {label}
      </label>
      {children}
      {hint && <p className="mt-1 text-sm text-ink-700">{hint}</p>}
      <FieldError id={id} message={error} />
    </div>
  );
}

/** A number typed in the user's unit; text input with a decimal keypad so a comma or an empty value can be typed. */
export function QuantityField({
  id,
  label,
  unit,
  registration,
  error,
  hint,
  placeholder,
}: {
  id: string;
  label: string;
  unit: string;
  registration: UseFormRegisterReturn;
  error?: string;
  hint?: ReactNode;
  placeholder?: string;
}) {
  return (
    <Field id={id} label={`${label} (${unit})`} hint={hint} error={error}>
      <div className="flex items-stretch">
        <input
          id={id}
          type="text"
          inputMode="decimal"
          autoComplete="off"
          placeholder={placeholder}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `${id}-error` : undefined}
          className="field-input touch-input rounded-r-none"
          {...registration}
        />
        <span className="inline-flex min-w-14 items-center justify-center rounded-r-lg border border-l-0 border-ink-200 bg-ink-50 px-3 font-semibold text-ink-700" aria-hidden="true">
          {unit}
        </span>
      </div>
    </Field>
  );
}

/** Large radio buttons in a row (thumb-sized), for a handful of options. */
export function Segmented<T extends string>({
  name,
  legend,
  options,
  registration,
  error,
}: {
  name: string;
  legend: string;
  options: readonly { value: T; label: string }[];
  registration: UseFormRegisterReturn;
  error?: string;
}) {
  return (
    <fieldset>
      <legend className="field-label">{legend}</legend>
      <div className="flex flex-wrap gap-2">
        {options.map((o) => (
          <label
            key={o.value}
            className="touch-choice has-[:checked]:border-ink-900 has-[:checked]:bg-ink-900 has-[:checked]:text-chalk"
          >
            <input type="radio" value={o.value} className="sr-only" {...registration} />
            {o.label}
          </label>
        ))}
      </div>
      <FieldError id={name} message={error} />
    </fieldset>
  );
}

/**
 * A select bound to the form as a controlled value. The options of most selects come from a catalogue that
 * loads after the form: an uncontrolled select shows its first option until then and a blur would read that
 * back into the form, so a stored choice would be lost. Controlled, the stored value is shown as soon as its
 * option exists and is never replaced by what the DOM happened to show.
 */
export function SelectField<T extends FieldValues>({
  control,
  name,
  id,
  className = 'field-input touch-input',
  onValueChange,
  invalid,
  children,
}: {
  control: Control<T>;
  name: FieldPath<T>;
  id: string;
  className?: string;
  onValueChange?: (value: string) => void;
  invalid?: boolean;
  children: ReactNode;
}) {
  const { field } = useController({ control, name });
  return (
    <select
      id={id}
      name={field.name}
      ref={field.ref}
      className={className}
      value={(field.value as string | null | undefined) ?? ''}
      aria-invalid={invalid ? true : undefined}
      onBlur={field.onBlur}
      onChange={(e) => {
        field.onChange(e.target.value);
        onValueChange?.(e.target.value);
      }}
    >
      {children}
    </select>
  );
}
