import type { CouponListQuery } from '../../../shared/schemas/coupons';
import type { ResinListQuery, ResinLotListQuery, SpeciesListQuery } from '../../../shared/schemas/reference';
import type { RunListQuery } from '../../../shared/schemas/runs';
import type { TrialListQuery } from '../../../shared/schemas/trials';
import type { ListQuery } from '../../../shared/schemas/common';

/**
 * Every query key of the client, in one place. Each resource has one root (`all`); a feature may add
 * keys of its own under its root (`[...queryKeys.findings.all, 'thread', id]`) but never invents a root,
 * so invalidating a root reaches every screen and picker that shows that resource.
 */
export const queryKeys = {
  session: {
    all: ['session'] as const,
    me: () => ['session', 'me'] as const,
  },
  species: {
    all: ['species'] as const,
    /** The light picker list (`/options`). */
    options: () => ['species', 'options'] as const,
    list: (q: Partial<SpeciesListQuery>) => ['species', 'list', q] as const,
  },
  resins: {
    all: ['resins'] as const,
    /** The light picker list (`/options`). */
    options: () => ['resins', 'options'] as const,
    list: (q: Partial<ResinListQuery>) => ['resins', 'list', q] as const,
  },
  lots: {
    all: ['resin-lots'] as const,
    /** The light picker list (`/options`). */
    options: () => ['resin-lots', 'options'] as const,
    list: (q: Partial<ResinLotListQuery>) => ['resin-lots', 'list', q] as const,
  },
  trials: {
    all: ['trials'] as const,
    /** The light picker list (`/options`). */
    options: () => ['trials', 'options'] as const,
    lists: () => ['trials', 'list'] as const,
    list: (q: Partial<TrialListQuery>) => ['trials', 'list', q] as const,
    detail: (id: number) => ['trials', 'detail', id] as const,
    labels: (id: number) => ['trials', 'detail', id, 'labels'] as const,
  },
  runs: {
    all: ['runs'] as const,
    /** The light picker list (`/options`). */
    options: () => ['runs', 'options'] as const,
    lists: () => ['runs', 'list'] as const,
    list: (q: Partial<RunListQuery>) => ['runs', 'list', q] as const,
    detail: (id: number) => ['runs', 'detail', id] as const,
    history: (id: number) => ['runs', 'detail', id, 'history'] as const,
  },
  bench: {
    all: ['bench'] as const,
    due: (withinHours: number) => ['bench', 'due', withinHours] as const,
  },
  coupons: {
    all: ['coupons'] as const,
    lists: () => ['coupons', 'list'] as const,
    list: (q: Partial<CouponListQuery>) => ['coupons', 'list', q] as const,
    full: (q: Partial<CouponListQuery>) => ['coupons', 'full', q] as const,
    /** Every coupon of a run or a trial, for the entry grid. */
    grid: (scope: { runId: number } | { trialId: number }) => ['coupons', 'grid', scope] as const,
    detail: (id: number) => ['coupons', 'detail', id] as const,
    history: (id: number) => ['coupons', 'detail', id, 'history'] as const,
  },
  imports: { all: ['imports'] as const },
  analysis: { all: ['analysis'] as const },
  evidence: { all: ['evidence'] as const },
  findings: { all: ['findings'] as const },
  wiki: { all: ['wiki'] as const },
  users: {
    all: ['users'] as const,
    list: (q: Partial<ListQuery>) => ['users', 'list', q] as const,
    /** Whom an invitation link invites (read before signing in). */
    invitation: (token: string) => ['users', 'invitation', token] as const,
  },
  outbox: {
    all: ['outbox'] as const,
    page: (page: number) => ['outbox', page] as const,
  },
  settings: {
    all: ['settings'] as const,
    /** The address printed labels open, worked out by the server from the settings and APP_URL. */
    labelAddress: () => ['settings', 'label-address'] as const,
  },
} as const;

type Root = readonly [string];
const k = queryKeys;

/**
 * What a change touches. A mutation names what it changed (`invalidate('measurements')`) and every
 * cached read that shows it is refreshed, whichever feature owns the screen. Add a row here when a new
 * kind of change appears; add a root to a row when a new screen starts showing that data.
 */
export const affects = {
  species: [k.species.all, k.lots.all, k.coupons.all, k.analysis.all],
  resins: [k.resins.all, k.lots.all, k.analysis.all],
  lots: [k.lots.all, k.resins.all, k.runs.all],
  trials: [k.trials.all, k.coupons.all, k.analysis.all],
  runs: [k.runs.all, k.bench.all, k.coupons.all, k.trials.all, k.lots.all],
  coupons: [k.coupons.all, k.trials.all, k.runs.all, k.bench.all, k.analysis.all],
  /** Weighings and checks: coupon results, run and trial progress, what the bench waits for, every analysis. */
  measurements: [k.coupons.all, k.trials.all, k.runs.all, k.bench.all, k.analysis.all],
  imports: [k.imports.all, k.coupons.all, k.trials.all, k.runs.all, k.bench.all, k.analysis.all],
  evidence: [k.evidence.all, k.findings.all],
  findings: [k.findings.all, k.wiki.all],
  wiki: [k.wiki.all],
  users: [k.users.all],
  outbox: [k.outbox.all],
  settings: [k.settings.all, k.bench.all, k.runs.all],
} as const satisfies Record<string, readonly Root[]>;

export type Change = keyof typeof affects;

/** The distinct roots that a set of changes touches (what `useInvalidate` refreshes). */
export function rootsFor(changes: readonly Change[]): Root[] {
  const seen = new Map<string, Root>();
  for (const c of changes) for (const root of affects[c]) seen.set(root[0], root);
  return [...seen.values()];
}
