import type { UseQueryResult } from '@tanstack/react-query';
import type { UseFormRegisterReturn } from 'react-hook-form';
import type { z } from 'zod';
import type { ResinLot, resinLotListSchema } from '../../../../shared/schemas/reference';
import { ErrorNote } from '../../../components/ui/page';

/** The plain words on a lot's age, beside the pick: past its shelf life, close to it, or not active. */
export function lotWarning(lot: Pick<ResinLot, 'expired' | 'expiringSoon' | 'expiresOn' | 'ageDays' | 'shelfLifeDays' | 'status'>): string | null {
  if (lot.expired)
    return `Warning: this lot is past its ${lot.shelfLifeDays}-day shelf life (${lot.ageDays} days old, expired ${lot.expiresOn}). Resin past its shelf life may not cure fully.`;
  if (lot.expiringSoon) return `Warning: this lot reaches its ${lot.shelfLifeDays}-day shelf life on ${lot.expiresOn} (${lot.ageDays} days old).`;
  if (lot.status !== 'active') return `Warning: this lot is marked ${lot.status}.`;
  return null;
}

/**
 * The resin-lot pick of a run, with the lot's age said beside it and the species already through it (a dark
 * wood can stain a lot that later serves pale ones). `warnFor` says whether the picked lot's age is worth a
 * warning (a lot the run already had was warned about when it was picked).
 */
export function LotSelect({
  id,
  lots,
  registration,
  pickedId,
  error,
  emptyLabel,
  extraOption,
  warnFor = () => true,
}: {
  id: string;
  lots: UseQueryResult<z.infer<typeof resinLotListSchema>>;
  registration: UseFormRegisterReturn;
  pickedId: number | null;
  error?: string | undefined;
  emptyLabel: string;
  /** A lot to offer that the list may leave out (the run's own lot, used up since). */
  extraOption?: { id: number; label: string } | null;
  warnFor?: (lot: ResinLot) => boolean;
}) {
  const lot = lots.data?.items.find((l) => l.id === pickedId);
  const warning = lot && warnFor(lot) ? lotWarning(lot) : null;
  const warningId = `${id}-warning`;
  const errorId = `${id}-error`;
  return (
    <div className="mb-4">
      <label htmlFor={id} className="field-label">
        Resin lot
      </label>
      <select
        id={id}
        className="field-input"
        aria-invalid={error ? true : undefined}
        aria-describedby={[warning ? warningId : '', error ? errorId : ''].filter(Boolean).join(' ') || undefined}
        {...registration}
        disabled={lots.isPending}
      >
        <option value="">{emptyLabel}</option>
        {extraOption && !lots.data?.items.some((l) => l.id === extraOption.id) && <option value={extraOption.id}>{extraOption.label}</option>}
        {lots.data?.items.map((l) => (
          <option key={l.id} value={l.id}>
            {l.code} · {l.resinName} · activated {l.activatedAt.slice(0, 10)}
            {l.expired ? ' (past shelf life)' : l.expiringSoon ? ' (expires soon)' : ''}
            {l.status !== 'active' ? ` (${l.status})` : ''}
          </option>
        ))}
      </select>
      {lots.isError && <ErrorNote error={lots.error} />}
      {warning && (
        <p id={warningId} className="mt-1 rounded border border-amber-ink px-2 py-1 text-sm text-amber-ink">
          {warning}
        </p>
      )}
      {lot && lot.speciesThroughLot.length > 0 && (
        <p className="mt-1 text-xs text-ink-soft">
          Species already through this lot: {lot.speciesThroughLot.join(', ')}. Dark, tannin-rich woods can stain a lot that later serves pale woods.
        </p>
      )}
      {error && (
        <p id={errorId} role="alert" className="mt-1 text-sm text-margin">
          {error}
        </p>
      )}
    </div>
  );
}
