import bcrypt from 'bcryptjs';
import { count } from 'drizzle-orm';
import type { Database_ } from './client';
import { settings } from './schema/admin';
import { users } from './schema/auth';

/** Password of every demo account; the demo exists only for trying the app, never for a real shop. */
export const DEMO_PASSWORD = 'lumenbook-demo';

// An invented shop and invented people. Any likeness to a real shop or person is accidental.
export const DEMO_USERS = [
  { email: 'admin@demo.test', name: 'Wren Ashdown (owner)', role: 'admin' },
  { email: 'reviewer@demo.test', name: 'Ilse Marrow (quality)', role: 'reviewer' },
  { email: 'tech@demo.test', name: 'Teo Brackett (bench)', role: 'technician' },
  { email: 'viewer@demo.test', name: 'Juno Pell (apprentice)', role: 'viewer' },
] as const;

export const DEMO_SHOP = { shopName: 'Quillfern Hollow Blank Works (demo)', altitudeM: 1600 };

export function isEmpty(database: Database_): boolean {
  return (database.db.select({ n: count() }).from(users).get()?.n ?? 0) === 0;
}

/**
 * Writes the demo scenario into an empty database, in one transaction. Later features append their
 * own demo records through `demoSeeders`.
 */
export function seedDemo(database: Database_, options: { bcryptCost?: number } = {}): boolean {
  if (!isEmpty(database)) return false;
  const hash = bcrypt.hashSync(DEMO_PASSWORD, options.bcryptCost ?? 12);
  database.db.transaction((tx) => {
    for (const u of DEMO_USERS) tx.insert(users).values({ ...u, passwordHash: hash }).run();
    for (const [key, value] of Object.entries(DEMO_SHOP)) tx.insert(settings).values({ key, value }).run();
  });
  return true;
}
