import type { ResinLot } from '../../../../shared/schemas/reference';
import { LOT_EXPIRING_SOON_DAYS } from '../../../../shared/schemas/reference';

type LotAge = Pick<ResinLot, 'expired' | 'expiringSoon' | 'expiresOn'>;

/** The lot's shelf-life state in words (never colour alone): "Expired", "Expires soon", or nothing. */
export function lotExpiryWord(lot: LotAge): 'Expired' | 'Expires soon' | null {
  if (lot.expired) return 'Expired';
  if (lot.expiringSoon) return 'Expires soon';
  return null;
}

/** A marked word beside a lot wherever it is shown or picked; renders nothing for a lot well within its shelf life. */
export function LotExpiryMark({ lot, long = false }: { lot: LotAge; long?: boolean }) {
  const word = lotExpiryWord(lot);
  if (!word) return null;
  const expired = word === 'Expired';
  return (
    <span
      className={`inline-block rounded border px-1.5 py-0.5 text-xs font-semibold ${
        expired ? 'border-margin bg-white text-margin' : 'border-amber-ink bg-amber-light text-amber-ink'
      }`}
    >
      {word}
      {long && (expired ? ` (past its shelf life since ${lot.expiresOn})` : ` (on ${lot.expiresOn}, within ${LOT_EXPIRING_SOON_DAYS} days)`)}
    </span>
  );
}
