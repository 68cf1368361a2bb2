import type { Logger } from 'pino';
import type { Database_ } from './db/client';
import type { Config } from './env';
import type { SqliteSessionStore } from './http/session-store';
import type { Mailer } from './mail/mailer';

/** What createApp is built from; tests pass the same things built on a temp directory. */
export interface AppDeps {
  config: Config;
  database: Database_;
  mailer: Mailer;
  logger: Logger;
  /** bcrypt cost; tests lower it so they stay fast, production uses the default. */
  bcryptCost?: number;
  /** Failed sign-ins allowed per account (`limit`) and per client address (`perAddress`) per window. */
  loginRateLimit?: { windowMs: number; limit: number; perAddress?: number };
  /** Failed signing attempts (wrong password at approval) allowed per signer per window. */
  signingRateLimit?: { windowMs: number; limit: number };
  /** A clock the tests can move (token expiry). */
  now?: () => Date;
  /** The built client served in production (default dist/client); tests point it at a small folder of their own. */
  clientDir?: string;
}

/** Deps as the features see them, with the session store the app created. */
export interface FeatureDeps extends Required<Pick<AppDeps, 'config' | 'database' | 'mailer' | 'logger' | 'now'>> {
  sessions: SqliteSessionStore;
  bcryptCost: number;
}
