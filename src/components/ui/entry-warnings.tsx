import { useEffect, useId, useState } from 'react';
import type { EntryWarning } from '../../../shared/runs/contradictions';

/**
 * Whether the user has said "go on" to the warnings shown. A new or changed warning asks again, so a
 * tick given for one contradiction never lets a different one pass unseen.
 */
export function useGoOnAnyway(warnings: readonly EntryWarning[]) {
  const key = warnings.map((w) => `${w.code}:${w.couponIds.join(',')}`).join('|');
  const [confirmedFor, setConfirmedFor] = useState<string | null>(null);
  const [asked, setAsked] = useState(false);
  useEffect(() => setAsked(false), [key]);
  const confirmed = warnings.length === 0 || confirmedFor === key;
  return {
    confirmed,
    /** True after a save was tried without the tick; the box then says why nothing was sent. */
    asked: asked && !confirmed,
    setConfirmed: (on: boolean) => setConfirmedFor(on ? key : null),
    /** Call on submit: false (and the box asks) while warnings are shown and not confirmed. */
    mayGoOn: () => {
      if (confirmed) return true;
      setAsked(true);
      return false;
    },
  };
}

/**
 * Contradictions between what is being entered and what the records say, with their reasons, and a
 * tick box to go on deliberately. A warning, never a block: the records may be the thing that is wrong.
 */
export function EntryWarnings({
  warnings,
  gate,
  action,
  className = '',
}: {
  warnings: readonly EntryWarning[];
  gate?: ReturnType<typeof useGoOnAnyway>;
  /** What going on does, in the tick box's words: "create the run", "start the vacuum". */
  action?: string;
  className?: string;
}) {
  const id = useId();
  if (warnings.length === 0) return null;
  return (
    <div role="group" aria-labelledby={`${id}-h`} className={`rounded border border-amber-ink px-3 py-2 text-sm ${className}`}>
      <p id={`${id}-h`} className="font-semibold text-amber-ink">
        {warnings.length === 1 ? 'This contradicts the records' : `${warnings.length} things contradict the records`}
      </p>
      <ul className="mt-1 list-disc space-y-1 pl-5 text-ink">
        {warnings.map((w) => (
          <li key={`${w.code}:${w.couponIds.join(',')}`} data-warning={w.code}>
            {w.message}
          </li>
        ))}
      </ul>
      {gate && action && (
        <>
          <label className="mt-2 flex min-h-6 items-start gap-2 font-medium">
            <input
              type="checkbox"
              className="mt-1 h-4 w-4"
              checked={gate.confirmed}
              onChange={(e) => gate.setConfirmed(e.target.checked)}
              aria-describedby={gate.asked ? `${id}-ask` : undefined}
            />
            <span>I have read this; {action} anyway</span>
          </label>
          {gate.asked && (
            <p id={`${id}-ask`} role="alert" className="mt-1 text-margin">
              Nothing was saved: tick the box above to {action} despite the warning, or change what you entered.
            </p>
          )}
        </>
      )}
    </div>
  );
}
