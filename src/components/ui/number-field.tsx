import { get, type FieldValues, type Path, type UseFormReturn } from 'react-hook-form';
import type { Quantity } from '../../../shared/units';
import { numberInput, requiredNumberInput } from '../../lib/forms/number-input';
import { useUnits } from '../../lib/use-units';
import { Field } from './field';

interface NumberFieldProps<T extends FieldValues> {
  // Any transformed output: the box only registers itself and reads its error.
  form: UseFormReturn<T, any, any>;
  name: Path<T>;
  label: string;
  /** The quantity, when the number has a unit the user chooses (mass, length…): the label shows the user's unit. */
  quantity?: Quantity;
  /** A fixed unit for the label when there is no quantity (%, N, HB). */
  unit?: string;
  hint?: string;
  /** The contract requires it: an empty box is missing (the contract's own message), not null. */
  required?: boolean;
  className?: string;
  disabled?: boolean;
}

/**
 * A number box: typed as text (decimal point or comma; `inputMode="decimal"` brings up the numeric keypad),
 * read with `parseNumber`, labelled with the user's unit for its quantity. The form holds the number in that
 * display unit; the form's `convertingResolver` converts it to SI with `toSi`.
 */
export function NumberField<T extends FieldValues>({ form, name, label, quantity, unit, hint, required, className, disabled }: NumberFieldProps<T>) {
  const units = useUnits();
  const shownUnit = quantity ? units.label(quantity) : unit;
  const error = (get(form.formState.errors, name) as { message?: string } | undefined)?.message;
  return (
    <div className={className}>
      <Field
        label={shownUnit ? `${label} (${shownUnit})` : label}
        registration={form.register(name, required ? requiredNumberInput : numberInput)}
        error={error}
        hint={hint}
        type="text"
        inputMode="decimal"
        autoComplete="off"
        disabled={disabled}
      />
    </div>
  );
}
