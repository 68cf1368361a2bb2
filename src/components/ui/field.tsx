import { useId, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes, type TextareaHTMLAttributes } from 'react';
import type { UseFormRegisterReturn } from 'react-hook-form';

interface Labelled {
  label: string;
  registration: UseFormRegisterReturn;
  error?: string;
  hint?: ReactNode;
}

/** The ids and ARIA attributes that tie a control to its hint and its announced error. */
interface ControlProps {
  id: string;
  className: string;
  'aria-invalid'?: true;
  'aria-describedby'?: string;
}

/**
 * The one shell of every form field: a label, the control, an optional hint, and the error
 * announced with role="alert" and tied to the control by aria-describedby.
 */
function FieldShell({ label, error, hint, children }: Omit<Labelled, 'registration'> & { children: (control: ControlProps) => ReactNode }) {
  const id = useId();
  const hintId = hint ? `${id}-hint` : undefined;
  const errorId = error ? `${id}-error` : undefined;
  return (
    <div className="mb-4">
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      {children({
        id,
        className: 'field-input',
        'aria-invalid': error ? true : undefined,
        'aria-describedby': [hintId, errorId].filter(Boolean).join(' ') || undefined,
      })}
      {hint && (
        <p id={hintId} className="mt-1 text-xs text-ink-faint">
          {hint}
        </p>
      )}
      {error && (
        <p id={errorId} className="mt-1 text-sm text-margin" role="alert">
          {error}
        </p>
      )}
    </div>
  );
}

type FieldProps = Labelled & Omit<InputHTMLAttributes<HTMLInputElement>, 'name'>;

/** A labelled input. */
export function Field({ label, registration, error, hint, ...input }: FieldProps) {
  return (
    <FieldShell label={label} error={error} hint={hint}>
      {(control) => <input {...control} {...registration} {...input} />}
    </FieldShell>
  );
}

type SelectFieldProps = Labelled & Omit<SelectHTMLAttributes<HTMLSelectElement>, 'name'> & { options: readonly { value: string; label: string }[] };

export function SelectField({ label, registration, error, hint, options, ...select }: SelectFieldProps) {
  return (
    <FieldShell label={label} error={error} hint={hint}>
      {(control) => (
        <select {...control} {...registration} {...select}>
          {options.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
      )}
    </FieldShell>
  );
}

type TextAreaFieldProps = Labelled & Omit<TextareaHTMLAttributes<HTMLTextAreaElement>, 'name'>;

export function TextAreaField({ label, registration, error, hint, ...rest }: TextAreaFieldProps) {
  return (
    <FieldShell label={label} error={error} hint={hint}>
      {(control) => <textarea rows={3} {...control} {...registration} {...rest} />}
    </FieldShell>
  );
}

export function FormError({ message }: { message?: string }) {
  if (!message) return null;
  return (
    <p className="mb-4 rounded border border-margin/40 bg-margin/10 px-3 py-2 text-sm text-margin" role="alert">
      {message}
    </p>
  );
}

/** A form's submit button (quiet while it is sending) and its Cancel, the same in every form. */
export function FormActions({ submitLabel, busy, onCancel }: { submitLabel: ReactNode; busy: boolean; onCancel: () => void }) {
  return (
    <div className="flex gap-2">
      <button type="submit" className="btn-primary" disabled={busy}>
        {submitLabel}
      </button>
      <button type="button" className="btn-quiet" onClick={onCancel}>
        Cancel
      </button>
    </div>
  );
}
