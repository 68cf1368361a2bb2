import { useId, type ReactNode, type TextareaHTMLAttributes } from 'react';
import type { UseFormRegisterReturn } from 'react-hook-form';

/** Number inputs: an empty box is "not given" (null), not zero and not NaN. */
export const numberOrNull = {
  setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? null : typeof v === 'number' ? v : Number(v)),
};
/** Optional text: an empty box is null rather than "". */
export const textOrNull = { setValueAs: (v: unknown) => (typeof v === 'string' && v.trim() === '' ? null : v) };

interface TextAreaFieldProps extends Omit<TextareaHTMLAttributes<HTMLTextAreaElement>, 'name'> {
  label: string;
  registration: UseFormRegisterReturn;
  error?: string;
  hint?: ReactNode;
}

export function TextAreaField({ label, registration, error, hint, ...rest }: TextAreaFieldProps) {
  const id = useId();
  const hintId = hint ? `${id}-hint` : undefined;
  const errorId = error ? `${id}-error` : undefined;
  return (
    <div className="mb-4">
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      <textarea
        id={id}
        rows={3}
        className="field-input"
        aria-invalid={error ? true : undefined}
        aria-describedby={[hintId, errorId].filter(Boolean).join(' ') || undefined}
        {...registration}
        {...rest}
      />
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
