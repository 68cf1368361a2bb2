import { DomainError } from '../../../shared/domain/errors';
import { altitudeQuestion } from '../../../shared/domain/vacuum';
import { useUnits } from '../../lib/use-units';

/**
 * The question put beside an altitude box when the typed altitude would make every normal gauge reading
 * impossible (feet typed as metres, usually), worded in the unit the box shows. Nothing otherwise.
 */
export function AltitudeQuestion({ id, altitudeM }: { id: string; altitudeM: number | null | undefined }) {
  const units = useUnits();
  if (altitudeM == null || !Number.isFinite(altitudeM)) return null;
  let question: string | null;
  try {
    question = altitudeQuestion(altitudeM, units.unit('altitude') === 'ft' ? 'us' : 'metric');
  } catch (e) {
    // Out of the model's range: the contract's own message on the box says so.
    if (!(e instanceof DomainError)) throw e;
    question = null;
  }
  if (!question) return null;
  return (
    <p id={id} role="status" className="-mt-2 mb-4 rounded border border-amber-ink px-2 py-1 text-sm text-amber-ink">
      {question}
    </p>
  );
}
