import type { FeatureDeps } from '../../deps';
import { AppError } from '../../http/errors';
import { clearLoginFailures, countLoginFailures, recordLoginFailure } from './auth.repo';

export interface LoginLimits {
  windowMs: number;
  /** Failed sign-ins allowed per account (the e-mail tried) per window. */
  limit: number;
  /** Failed sign-ins allowed per client address per window (default three times the account limit). */
  perAddress?: number;
}

/**
 * Sign-in failures counted in SQLite per account and per client address, so the limit holds when an
 * attacker spreads tries over addresses or over accounts, and survives a restart. Correct sign-ins are
 * not counted (a shop behind one router does not lock itself out), and one clears its account's count.
 * The address is `req.ip`, which believes X-Forwarded-For only from a proxy named in TRUST_PROXY.
 */
export function createLoginThrottle(deps: FeatureDeps, limits: LoginLimits) {
  const { db } = deps.database;
  const perAddress = limits.perAddress ?? limits.limit * 3;
  const since = () => new Date(deps.now().getTime() - limits.windowMs).toISOString();

  return {
    /** Throws 429 when the account or the address has used up its failures. */
    check(email: string, address: string): void {
      const from = since();
      if (countLoginFailures(db, 'account', email, from) >= limits.limit || countLoginFailures(db, 'address', address, from) >= perAddress) {
        throw new AppError('rate_limited', 'Too many failed sign-ins; wait a few minutes and try again');
      }
    },
    failed(email: string, address: string): void {
      const entries = [
        { scope: 'account' as const, key: email },
        { scope: 'address' as const, key: address },
      ];
      recordLoginFailure(db, entries, deps.now().toISOString(), since());
    },
    succeeded(email: string): void {
      clearLoginFailures(db, 'account', email);
    },
  };
}
