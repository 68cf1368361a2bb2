import type { CouponRole, RunStage, WeighingStage } from '../constants/records';
import { STAGE_LABELS, runProgress, type StageTimes } from './stages';

/**
 * Contradictions between what is being entered and what the records already say. None of them is
 * impossible (a lot may be swapped on purpose, a cured weighing may be typed in late from paper), so
 * each is a warning with its reason, shown at the moment of entry; the user may go on deliberately.
 * Pure, so the form warns before the request and the server can say the same thing in its answer.
 */
export const ENTRY_WARNING_CODES = [
  'lot-resin-differs',
  'conditions-mixed',
  'weighing-ahead-of-run',
  'weighing-without-run',
  'vacuum-without-dry-weight',
] as const;
export type EntryWarningCode = (typeof ENTRY_WARNING_CODES)[number];

export interface EntryWarning {
  code: EntryWarningCode;
  /** Plain words: what contradicts what, and what it would mean. */
  message: string;
  /** The coupons the warning is about. */
  couponIds: number[];
}

function listTags(tags: readonly string[]): string {
  return tags.length <= 5 ? tags.join(', ') : `${tags.slice(0, 5).join(', ')} and ${tags.length - 5} more`;
}
const plural = (n: number, one: string, many: string) => (n === 1 ? one : many);

export interface ResinRef {
  id: number;
  name: string;
}

export interface CouponPlan {
  id: number;
  tag: string;
  role: CouponRole;
  /** The resin the trial planned for the coupon's condition; null for a coupon outside any plan. */
  plannedResin: ResinRef | null;
}

/**
 * A run's resin lot against the resin its coupons' trial conditions planned. Controls carry no plan
 * and never enter a run; coupons without a plan cannot contradict one. One warning per planned resin
 * that differs, so a run that mixes conditions says which coupons wanted what.
 */
export function lotResinWarnings(lot: { code: string; resin: ResinRef } | null, coupons: readonly CouponPlan[]): EntryWarning[] {
  if (!lot) return [];
  const byResin = new Map<number, { resin: ResinRef; coupons: CouponPlan[] }>();
  for (const c of coupons) {
    if (c.role !== 'treated' || !c.plannedResin || c.plannedResin.id === lot.resin.id) continue;
    const group = byResin.get(c.plannedResin.id) ?? { resin: c.plannedResin, coupons: [] };
    group.coupons.push(c);
    byResin.set(c.plannedResin.id, group);
  }
  return [...byResin.values()].map(({ resin, coupons: cs }) => ({
    code: 'lot-resin-differs',
    couponIds: cs.map((c) => c.id),
    message:
      `Lot ${lot.code} is ${lot.resin.name}, but the trial planned ${resin.name} for ` +
      `${cs.length} ${plural(cs.length, 'coupon', 'coupons')} in this run (${listTags(cs.map((c) => c.tag))}). ` +
      `Their results would be filed under a resin they did not get; check the lot or the coupons.`,
  }));
}

/** The run a coupon went through, as far as the warnings need it. */
export interface RunOfCoupon {
  code: string;
  stages: readonly StageTimes[];
}

function stageOf(run: RunOfCoupon, stage: RunStage): StageTimes | undefined {
  return run.stages.find((s) => s.stage === stage);
}

/** Where the run is now, in words: "is still at its drying stage", "has not started". */
function whereRunIs(run: RunOfCoupon): string {
  const p = runProgress(run.stages);
  if (p.current === null) return 'has not started';
  const label = STAGE_LABELS[p.current].toLowerCase();
  if (p.status === 'finished') return 'has finished its cure';
  return p.currentOpen ? `is still at its ${label} stage` : `has ended its ${label} stage`;
}

const before = (at: string, than: string) => Date.parse(at) < Date.parse(than);

/**
 * Why a weighing at `stage`, taken at `measuredAt`, does not fit the run's recorded stages, or null
 * when it fits. The stage a weighing names must have happened by then: soaked after the soak started,
 * cured after the cure ended; a dry or drying-check weighing after the vacuum started would weigh
 * resin too. Wet-test weighings come after the cure.
 */
export function weighingStageProblem(stage: WeighingStage, measuredAt: string, run: RunOfCoupon): string | null {
  const vacuum = stageOf(run, 'vacuum');
  const soak = stageOf(run, 'soak');
  const cure = stageOf(run, 'cure');
  const where = whereRunIs(run);
  switch (stage) {
    case 'dry':
    case 'drying-check':
      if (vacuum && !before(measuredAt, vacuum.startedAt)) {
        return `run ${run.code} started its vacuum at ${vacuum.startedAt}, so a ${stage === 'dry' ? 'dry' : 'drying-check'} weighing taken after that would include resin`;
      }
      return null;
    case 'soaked':
      if (!soak) return `run ${run.code} ${where}: no soak is recorded yet`;
      if (before(measuredAt, soak.startedAt)) return `it is dated before run ${run.code}'s soak started (${soak.startedAt})`;
      return null;
    case 'cured':
    case 'wet-test': {
      const what = stage === 'cured' ? 'cured' : 'wet-test';
      if (!cure) return `run ${run.code} ${where}: no cure is recorded yet, so a ${what} weight cannot have been taken`;
      if (cure.endedAt === null) return `run ${run.code} is still curing (no end time recorded), so a ${what} weight is early`;
      if (before(measuredAt, cure.endedAt)) return `it is dated before run ${run.code}'s cure ended (${cure.endedAt})`;
      return null;
    }
    default:
      return null;
  }
}

export interface WeighingEntry {
  couponId: number;
  tag: string;
  role: CouponRole;
  stage: WeighingStage;
  /** When the weighing was taken; the moment of entry when not given. */
  measuredAt: string;
  /** The run the coupon is in, or null when it is in none. */
  run: RunOfCoupon | null;
}

/**
 * Warnings for a batch of weighings (one form or a whole grid save), grouped so that forty cured
 * weights typed while a run is drying give one message naming the run and the coupons.
 */
export function weighingWarnings(entries: readonly WeighingEntry[]): EntryWarning[] {
  const groups = new Map<string, { code: EntryWarningCode; text: string; stage: WeighingStage; items: WeighingEntry[] }>();
  const add = (code: EntryWarningCode, text: string, e: WeighingEntry) => {
    const key = `${code}\u0000${e.stage}\u0000${text}`;
    const g = groups.get(key) ?? { code, text, stage: e.stage, items: [] };
    g.items.push(e);
    groups.set(key, g);
  };
  for (const e of entries) {
    if (e.role !== 'treated') continue; // controls never enter a run; their weighings cannot contradict one
    if (e.run === null) {
      if (e.stage === 'soaked' || e.stage === 'cured') add('weighing-without-run', `the coupon is in no run, so nothing records a soak or a cure`, e);
      continue;
    }
    const problem = weighingStageProblem(e.stage, e.measuredAt, e.run);
    if (problem) add('weighing-ahead-of-run', problem, e);
  }
  return [...groups.values()].map((g) => {
    const n = g.items.length;
    const what = g.stage === 'drying-check' ? 'drying-check' : g.stage;
    return {
      code: g.code,
      couponIds: g.items.map((e) => e.couponId),
      message: `${n} ${what} ${plural(n, 'weight', 'weights')} (${listTags(g.items.map((e) => e.tag))}): ${g.text}. Check the stage and the date, or record the run's stage first.`,
    };
  });
}

export interface RunCouponWeighed {
  id: number;
  tag: string;
  role: CouponRole;
  hasDryWeighing: boolean;
}

/**
 * Starting the vacuum while coupons of the run have no dry weighing: their uptake can never be worked
 * out afterwards, because the resin is in them from then on.
 */
export function vacuumStartWarning(coupons: readonly RunCouponWeighed[]): EntryWarning | null {
  const missing = coupons.filter((c) => c.role === 'treated' && !c.hasDryWeighing);
  if (missing.length === 0) return null;
  const n = missing.length;
  return {
    code: 'vacuum-without-dry-weight',
    couponIds: missing.map((c) => c.id),
    message:
      `${n} ${plural(n, 'coupon has', 'coupons have')} no dry weight yet (${listTags(missing.map((c) => c.tag))}). ` +
      `Once the vacuum starts the resin goes in, and ${plural(n, 'its', 'their')} uptake can never be worked out. Weigh ${plural(n, 'it', 'them')} dry first.`,
  };
}

export interface CouponOfCondition {
  id: number;
  tag: string;
  role: CouponRole;
  /** The trial condition the coupon was made for; null outside any plan. */
  condition: { id: number; label: string } | null;
}

/**
 * Coupons of more than one trial condition picked for one run. A run is one set of process settings
 * (vacuum, soak, cure), so coupons planned for different settings would all be filed under this run's
 * times and the comparison the trial planned between them is lost. Coupons without a condition do not
 * count as a condition of their own: a run may carry spare pieces beside one condition.
 */
export function mixedConditionsWarning(coupons: readonly CouponOfCondition[]): EntryWarning | null {
  const byCondition = new Map<number, { label: string; tags: string[]; ids: number[] }>();
  for (const c of coupons) {
    if (c.role !== 'treated' || !c.condition) continue;
    const g = byCondition.get(c.condition.id) ?? { label: c.condition.label, tags: [], ids: [] };
    g.tags.push(c.tag);
    g.ids.push(c.id);
    byCondition.set(c.condition.id, g);
  }
  if (byCondition.size < 2) return null;
  const groups = [...byCondition.values()];
  return {
    code: 'conditions-mixed',
    couponIds: groups.flatMap((g) => g.ids),
    message:
      `The picked coupons belong to ${groups.length} different trial conditions: ` +
      groups.map((g) => `${g.label} (${g.tags.length}: ${listTags(g.tags)})`).join('; ') +
      `. One run has one vacuum, soak and cure, so their results would all be filed under this run's settings. Pick one condition, or go on if the plan is meant to share this run.`,
  };
}
