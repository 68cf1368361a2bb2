import bcrypt from 'bcryptjs';
import { count } from 'drizzle-orm';
import { eq } from 'drizzle-orm';
import type { Database_, Db } from './db/client';
import { settings } from './db/schema/admin';
import { users } from './db/schema/auth';
import type { Role } from '../shared/constants/roles';
import { DEMO_RESINS, seedReferenceDemo, seedReferenceSpecies } from './features/reference/reference.seed';
import { DEMO_TRIAL_CODE, demoTrialCoupons, seedTrialsDemo } from './features/trials/trials.seed';
import { createAnalysisService } from './features/analysis/analysis.service';
import { seedFindingsDemo } from './features/findings/findings.seed';
import { trials } from './db/schema/trials';
import { resins } from './db/schema/reference';
import { seedRunsDemo } from './features/runs/runs.seed';
import { rebuildResults, resultsIncomplete } from './measurements/results';

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

/** What a feature's demo seeder gets: the transaction, the demo users by role, and a fixed "now". */
export interface DemoContext {
  tx: Db;
  userIds: Record<Role, number>;
  now: Date;
}
export type DemoSeeder = (ctx: DemoContext) => void;

/**
 * Reference data every installation needs (published handbook species), written whenever it is missing,
 * demo or not. Features register theirs here.
 */
const referenceSeeders: ((db: Db) => void)[] = [seedReferenceSpecies];

/** Feature demo seeders, run in this order inside the one demo transaction. */
const demoSeeders: DemoSeeder[] = [seedReferenceDemo, (ctx) => seedTrialsDemo(ctx, DEMO_RESINS), seedRunsDemo];

/**
 * A database from before the results table (or a restored older backup) has coupons without a results
 * row: compute them all once, at start.
 */
export function ensureResults(database: Database_): boolean {
  if (!resultsIncomplete(database.db)) return false;
  database.db.transaction((tx) => rebuildResults(tx));
  return true;
}

export function seedReference(database: Database_): void {
  database.db.transaction((tx) => {
    for (const seed of referenceSeeders) seed(tx);
  });
}

/**
 * Writes the demo scenario into an empty database, in one transaction: all of it or none of it.
 */
export function seedDemo(database: Database_, options: { bcryptCost?: number; now?: Date } = {}): boolean {
  seedReference(database);
  if (!isEmpty(database)) return false;
  const hash = bcrypt.hashSync(DEMO_PASSWORD, options.bcryptCost ?? 12);
  database.db.transaction((tx) => {
    for (const u of DEMO_USERS)
      tx.insert(users)
        .values({ ...u, passwordHash: hash })
        .run();
    for (const [key, value] of Object.entries(DEMO_SHOP)) tx.insert(settings).values({ key, value }).run();
    const userIds = Object.fromEntries(
      DEMO_USERS.map((u) => [u.role, tx.select({ id: users.id }).from(users).where(eq(users.email, u.email)).get()!.id]),
    ) as Record<Role, number>;
    const ctx: DemoContext = { tx, userIds, now: options.now ?? new Date() };
    for (const seed of demoSeeders) seed(ctx);
    // The seeders write coupons and readings directly; their results rows are computed once here.
    rebuildResults(tx);
    // A saved view and a finding read the results, so they come last.
    seedEvidenceDemo(ctx, database.db);
  });
  return true;
}

/**
 * The demo's evidence: a saved view of the main trial comparing the two demo resins on WPG, and a finding
 * that quotes its numbers, submitted for review. The words are written from the numbers the view froze,
 * so the finding never claims what the (generated) demo data do not show.
 */
function seedEvidenceDemo(ctx: DemoContext, connection: Db): void {
  const { tx, userIds, now } = ctx;
  const trial = tx.select({ id: trials.id, title: trials.title }).from(trials).where(eq(trials.code, DEMO_TRIAL_CODE)).get();
  const coupons = demoTrialCoupons(tx);
  const resinIds = [...new Set(coupons.flatMap((c) => (c.resinId === null ? [] : [c.resinId])))];
  const speciesIds = [...new Set(coupons.map((c) => c.speciesId))];
  if (!trial || resinIds.length !== 2) return;
  const [clearId, dyedId] = resinIds as [number, number];
  const names = new Map(
    tx
      .select({ id: resins.id, name: resins.name })
      .from(resins)
      .all()
      .map((r) => [r.id, r.name]),
  );
  const tech = tx.select({ id: users.id, name: users.name }).from(users).where(eq(users.id, userIds.technician)).get()!;
  // The analysis keeps its data version with triggers on the connection itself (a transaction handle has
  // none); statements through the connection still run inside the open demo transaction.
  const analysis = createAnalysisService({ db: connection, now: () => now });
  // Saving a view reads only the author's id and name.
  const saved = analysis.saveEvidence({ ...tech, email: '', role: 'technician' } as Parameters<typeof analysis.saveEvidence>[0], {
    title: `${trial.title}: WPG by resin`,
    note: 'Demo saved view: the demo trial with both resins compared on weight percent gain.',
    view: {
      filters: { trialId: [trial.id] },
      sgBasis: 'measured',
      compare: {
        a: { resinId: clearId, label: names.get(clearId) ?? 'clear' },
        b: { resinId: dyedId, label: names.get(dyedId) ?? 'dyed' },
        metric: 'wpgPct',
      },
    },
  });
  const compare = saved.evidence.snapshot.numbers.compare;
  if (!compare) return;
  const bodyMd = [
    `Demo finding, written from invented demo data for trying the review.`,
    ``,
    `**What the trial compared.** The clear and the dyed blend under the same vacuum, soak and cure, on the three species of ${DEMO_TRIAL_CODE}.`,
    ``,
    `**What it showed.** ${compare.sentence}`,
    ...(compare.warnings.length ? ['', `**How sure.** ${compare.warnings.join(' ')}`] : []),
    ``,
    `The saved view below holds the numbers and the plot as they were when this was written.`,
  ].join('\n');
  seedFindingsDemo(ctx, {
    title: `Dyed and clear blend: weight gain in ${DEMO_TRIAL_CODE}`,
    bodyMd,
    trialIds: [trial.id],
    speciesIds,
    resinIds: [clearId, dyedId],
    savedViewId: saved.evidence.id,
  });
}
