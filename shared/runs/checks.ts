import type { LotStatus } from '../constants/records';
import { DomainError } from '../domain/errors';
import { reachedConstantMass } from '../domain/drying';
import { inCureWindow } from '../domain/rules-of-thumb';
import type { UnitChoice } from '../units';
import { durationSeconds, formatDuration, formatTemperature, formatTemperatureRange } from './format';
import { soakRequirement } from './timers';
import { stageMinutes, type StageTimes } from './stages';
import { DEFAULT_CURE_WINDOW_C, DEFAULT_SHELF_LIFE_DAYS, LOT_NEAR_EXPIRY_DAYS, MIN_CURE_MINUTES, THIN_COUPON_MAX_MM } from './thresholds';

export const RUN_RULES = ['soak-time', 'cure-temperature', 'drying-constant-mass', 'lot-shelf-life', 'dry-weighings', 'cure-time'] as const;
export type RunRule = (typeof RUN_RULES)[number];

export const CHECK_STATUSES = ['ok', 'warn', 'fail', 'pending'] as const;
export type CheckStatus = (typeof CHECK_STATUSES)[number];

export interface RuleCheck {
  rule: RunRule;
  status: CheckStatus;
  /** Plain words a technician can act on. */
  reason: string;
  /** Coupons the finding is about, when it is about some of them. */
  couponIds?: number[];
}

export interface RunCheckStage extends StageTimes {
  ovenSetC?: number | null;
  ovenMeasuredC?: number | null;
}

export interface RunCheckInput {
  stages: readonly RunCheckStage[];
  resin: { name: string; cureMinC: number | null; cureMaxC: number | null; shelfLifeDays: number | null } | null;
  lot: { code: string; activatedAt: string; status: LotStatus } | null;
  coupons: readonly {
    id: number;
    tag: string;
    /** Dry thickness, mm, when measured. */
    thicknessMm: number | null;
    hasDryWeighing: boolean;
    dryingChecks: readonly { at: string; massG: number }[];
  }[];
  dryingRule: { minIntervalHours: number; maxChangePct: number };
  now: Date;
  /** The reader's units for temperatures in the reasons (stored values stay °C). Metric when omitted. */
  units?: UnitChoice;
}

const DAY = 86_400_000;

/** A duration in words; see formatDuration (kept under this name for existing callers). */
export const formatMinutes = formatDuration;

function listTags(tags: string[]): string {
  return tags.length <= 5 ? tags.join(', ') : `${tags.slice(0, 5).join(', ')} and ${tags.length - 5} more`;
}

function stageOf(input: RunCheckInput, stage: RunCheckStage['stage']): RunCheckStage | undefined {
  return input.stages.find((s) => s.stage === stage);
}

function soakTime(input: RunCheckInput): RuleCheck {
  const rule = 'soak-time';
  const vacuum = stageOf(input, 'vacuum');
  const soak = stageOf(input, 'soak');
  // The same requirement the bench timer counts down (timers.ts), so the two can never disagree.
  const req = soakRequirement(vacuum, soak);
  if (req === null) return { rule, status: 'pending', reason: 'Waiting for the vacuum stage to end; the soak should then last at least twice as long.' };
  const vac = formatDuration(req.vacuumMinutes);
  const needed = formatDuration(req.neededMinutes);
  if (!soak) return { rule, status: 'pending', reason: `The soak has not started; it should last at least ${needed} (twice the ${vac} vacuum).` };
  const soakMin = stageMinutes(soak);
  if (soakMin === null) {
    const until = req.earliestEnd;
    return {
      rule,
      status: 'pending',
      reason: `Soaking; it will have lasted ${needed} (twice the ${vac} vacuum) at ${until === null ? 'an unknown time' : new Date(until).toISOString()}.`,
    };
  }
  // Compared to the second, the resolution the durations are shown in.
  if (durationSeconds(soakMin) < durationSeconds(req.neededMinutes)) {
    return {
      rule,
      status: 'fail',
      reason: `The soak lasted ${formatDuration(soakMin)} (from its start to its end), less than twice the ${vac} vacuum (${needed}). Common practice, no published source: soak at least twice as long as the vacuum.`,
    };
  }
  return { rule, status: 'ok', reason: `The soak lasted ${formatDuration(soakMin)}, at least twice the ${vac} vacuum (${needed}).` };
}

function cureTemperature(input: RunCheckInput): RuleCheck {
  const rule = 'cure-temperature';
  const units = input.units ?? 'metric';
  const cure = stageOf(input, 'cure');
  const min = input.resin?.cureMinC ?? DEFAULT_CURE_WINDOW_C.min;
  const max = input.resin?.cureMaxC ?? DEFAULT_CURE_WINDOW_C.max;
  const window = `${formatTemperatureRange(min, max, units)}${input.resin ? ` for ${input.resin.name}` : ' (the usual window; no resin is recorded)'}`;
  if (!cure) return { rule, status: 'pending', reason: `The cure has not started; the oven should hold ${window}.` };
  const measured = cure.ovenMeasuredC ?? null;
  const set = cure.ovenSetC ?? null;
  if (measured === null && set === null) return { rule, status: 'warn', reason: `No oven temperature is recorded for the cure; it should be ${window}.` };
  // The separate thermometer wins: small ovens often read low against their own dial.
  const used = measured ?? (set as number);
  const which = measured !== null ? 'The thermometer in the oven read' : 'The oven was set to';
  const shown = formatTemperature(used, units, 2);
  if (!inCureWindow(used, min, max)) {
    return { rule, status: 'fail', reason: `${which} ${shown}, outside ${window}.` };
  }
  if (measured === null) {
    return {
      rule,
      status: 'warn',
      reason: `The oven was set to ${shown}, inside ${window}, but no separate thermometer reading is recorded; small ovens often read low.`,
    };
  }
  return { rule, status: 'ok', reason: `${which} ${shown}, inside ${window}.` };
}

function signedPct(v: number): string {
  const r = Math.round(v * 1000) / 1000;
  return `${r > 0 ? '+' : ''}${Object.is(r, -0) ? 0 : r} %`;
}

function dryingConstantMass(input: RunCheckInput): RuleCheck {
  const rule = 'drying-constant-mass';
  const { minIntervalHours, maxChangePct } = input.dryingRule;
  const criterion = `two drying checks at least ${minIntervalHours} h apart, with every weighing from the first to the second differing from the first by less than ${maxChangePct} %`;
  if (input.coupons.length === 0) return { rule, status: 'pending', reason: 'No coupons are in this run yet.' };
  const drying = stageOf(input, 'drying');
  const stillDrying = (drying !== undefined && drying.endedAt === null) || input.stages.length === 0;
  const notReached: { id: number; tag: string; compared: string | null }[] = [];
  let withChecks = 0;
  for (const c of input.coupons) {
    if (c.dryingChecks.length > 0) withChecks++;
    let reached = false;
    let compared: string | null = null;
    try {
      const r = reachedConstantMass(c.dryingChecks, { minIntervalHours, maxChangePct });
      reached = r.reached;
      if (r.compared && r.largestChangePct !== null && r.intervalHours !== null) {
        const between = r.largestChangePct !== r.lastChangePct ? `, ${signedPct(r.largestChangePct)} at most in between` : '';
        compared = `${c.tag} changed ${signedPct(r.lastChangePct as number)} from ${r.compared.from.at} to ${r.compared.to.at} (${formatDuration(r.intervalHours * 60)}${between})`;
      } else if (c.dryingChecks.length > 0) {
        compared = `${c.tag} has no two drying checks ${minIntervalHours} h apart`;
      }
    } catch (e) {
      if (!(e instanceof DomainError)) throw e;
    }
    if (!reached) notReached.push({ id: c.id, tag: c.tag, compared });
  }
  if (notReached.length === 0) return { rule, status: 'ok', reason: `All ${input.coupons.length} coupons reached constant mass (${criterion}).` };
  const ids = notReached.map((c) => c.id);
  if (withChecks === 0) {
    return stillDrying
      ? { rule, status: 'pending', reason: `No drying-check weighings yet; constant mass means ${criterion}.`, couponIds: ids }
      : {
          rule,
          status: 'warn',
          reason: `No drying-check weighings were recorded, so the run does not show that the coupons were dry (${criterion}).`,
          couponIds: ids,
        };
  }
  const details = notReached.flatMap((c) => (c.compared ? [c.compared] : []));
  const shown = details.slice(0, 3).join('; ') + (details.length > 3 ? `; and ${details.length - 3} more` : '');
  const message =
    `${notReached.length} of ${input.coupons.length} coupons have not shown constant mass (${criterion}): ${listTags(notReached.map((c) => c.tag))}.` +
    (shown ? ` Compared: ${shown}.` : '');
  return { rule, status: stillDrying ? 'pending' : 'warn', reason: stillDrying ? `Still drying. ${message}` : message, couponIds: ids };
}

function lotShelfLife(input: RunCheckInput): RuleCheck {
  const rule = 'lot-shelf-life';
  if (!input.lot)
    return { rule, status: input.stages.some((s) => s.stage !== 'drying') ? 'warn' : 'pending', reason: 'No resin lot is recorded for this run.' };
  const shelf = input.resin?.shelfLifeDays ?? DEFAULT_SHELF_LIFE_DAYS;
  // The lot's age when the resin went on the wood, or today while the run has not reached the resin yet.
  const usedAt = stageOf(input, 'vacuum')?.startedAt;
  const at = usedAt ? Date.parse(usedAt) : input.now.getTime();
  const ageDays = Math.floor((at - Date.parse(input.lot.activatedAt)) / DAY);
  const when = usedAt ? 'when the vacuum started' : 'today';
  if (ageDays < 0) {
    // Resin cannot go on the wood before it is activated: one of the two dates is wrong.
    const day = (ms: number) => new Date(ms).toISOString().slice(0, 10);
    return {
      rule,
      status: 'fail',
      reason: `Lot ${input.lot.code} is recorded as activated on ${day(Date.parse(input.lot.activatedAt))}, after ${usedAt ? `the vacuum started (${day(at)})` : `today (${day(at)})`}; a run cannot use resin before it is activated, so the lot's activation date or the run's times are wrong.`,
    };
  }
  if (ageDays > shelf) {
    return { rule, status: 'fail', reason: `Lot ${input.lot.code} was ${ageDays} days old ${when}, past its ${shelf}-day shelf life.` };
  }
  if (input.lot.status !== 'active') {
    return { rule, status: 'warn', reason: `Lot ${input.lot.code} is marked ${input.lot.status}.` };
  }
  if (shelf - ageDays <= LOT_NEAR_EXPIRY_DAYS) {
    return {
      rule,
      status: 'warn',
      reason: `Lot ${input.lot.code} was ${ageDays} days old ${when}, within ${LOT_NEAR_EXPIRY_DAYS} days of its ${shelf}-day shelf life.`,
    };
  }
  return { rule, status: 'ok', reason: `Lot ${input.lot.code} was ${ageDays} days old ${when}, within its ${shelf}-day shelf life.` };
}

function dryWeighings(input: RunCheckInput): RuleCheck {
  const rule = 'dry-weighings';
  if (input.coupons.length === 0) return { rule, status: 'pending', reason: 'No coupons are in this run yet.' };
  const missing = input.coupons.filter((c) => !c.hasDryWeighing);
  if (missing.length === 0) return { rule, status: 'ok', reason: `All ${input.coupons.length} coupons have a dry weighing.` };
  const vacuumStarted = stageOf(input, 'vacuum') !== undefined;
  const tags = listTags(missing.map((c) => c.tag));
  return vacuumStarted
    ? {
        rule,
        status: 'fail',
        reason: `${missing.length} coupons went under vacuum without a dry weighing, so their uptake cannot be worked out: ${tags}.`,
        couponIds: missing.map((c) => c.id),
      }
    : {
        rule,
        status: 'pending',
        reason: `${missing.length} coupons still need a dry weighing before the vacuum: ${tags}.`,
        couponIds: missing.map((c) => c.id),
      };
}

function cureTime(input: RunCheckInput): RuleCheck {
  const rule = 'cure-time';
  const cure = stageOf(input, 'cure');
  const minutes = stageMinutes(cure);
  const thick = input.coupons.filter((c) => c.thicknessMm !== null && c.thicknessMm > THIN_COUPON_MAX_MM);
  const thickNote = thick.length > 0 ? ` ${thick.length} coupons are thicker than ${THIN_COUPON_MAX_MM} mm and need longer than that.` : '';
  if (!cure) return { rule, status: 'pending', reason: `The cure has not started; thin pieces need at least ${formatMinutes(MIN_CURE_MINUTES)}.${thickNote}` };
  if (minutes === null) return { rule, status: 'pending', reason: `Curing; thin pieces need at least ${formatMinutes(MIN_CURE_MINUTES)}.${thickNote}` };
  if (durationSeconds(minutes) < durationSeconds(MIN_CURE_MINUTES)) {
    return {
      rule,
      status: 'fail',
      reason: `The cure lasted ${formatMinutes(minutes)}, less than the ${formatMinutes(MIN_CURE_MINUTES)} thin pieces need (common practice, no published source).${thickNote}`,
    };
  }
  return { rule, status: 'ok', reason: `The cure lasted ${formatMinutes(minutes)}, at least ${formatMinutes(MIN_CURE_MINUTES)}.${thickNote}` };
}

/**
 * The run's rule checks, each with a plain reason. The thresholds are the trade's rules of thumb
 * (common practice, no published source) except constant mass, whose criteria the shop sets.
 */
export function runChecks(input: RunCheckInput): RuleCheck[] {
  return [dryWeighings(input), dryingConstantMass(input), lotShelfLife(input), soakTime(input), cureTemperature(input), cureTime(input)];
}
