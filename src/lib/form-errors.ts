import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError } from './api-client';

/** Puts the server's fieldErrors on the form's fields; whatever has no field becomes the form's root error. */
export function applyServerErrors<T extends FieldValues>(error: unknown, setError: UseFormSetError<T>, fields: readonly string[]): void {
  if (!(error instanceof ApiError)) {
    setError('root', { message: 'Something went wrong; try again' });
    return;
  }
  let placed = false;
  for (const [field, messages] of Object.entries(error.fieldErrors)) {
    if (fields.includes(field)) {
      setError(field as Path<T>, { message: messages[0] });
      placed = true;
    }
  }
  if (!placed) setError('root', { message: error.message });
}
