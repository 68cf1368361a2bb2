import { inCureWindow } from '../domain/rules-of-thumb';
import { formatTemperature, formatTemperatureRange } from '../runs/format';
import type { UnitChoice } from '../units';

/**
 * Planning checks for a trial: will this plan be able to answer its question? Each warning carries a
 * plain reason. Pure, so the plan screen can show them while the grid is being filled in.
 */

/** Below this many coupons per condition a mean has too little behind it (common practice, no published source). */
export const MIN_COUPONS_PER_CONDITION = 3;

export const PLANNING_WARNING_CODES = ['few-coupons', 'no-controls', 'missing-cell', 'cure-outside-window', 'short-soak'] as const;
export type PlanningWarningCode = (typeof PLANNING_WARNING_CODES)[number];

export interface PlanningWarning {
  code: PlanningWarningCode;
  message: string;
  /** Index into the plan's conditions, when the warning is about one condition. */
  conditionIndex?: number;
  speciesId?: number;
  resinId?: number;
}

export interface PlannedCondition {
  speciesId: number;
  resinId: number;
  processLabel: string;
  couponsWanted: number;
  vacuumMinutes?: number | null;
  soakMinutes?: number | null;
  cureTempC?: number | null;
}

export interface PlanContext {
  speciesName: (id: number) => string;
  resin: (id: number) => { name: string; cureMinC: number; cureMaxC: number } | undefined;
  /** The reader's units for temperatures in the messages (stored values stay °C). Metric when omitted. */
  units?: UnitChoice;
}

export function planningWarnings(plan: { controlsPerSpecies: number; conditions: readonly PlannedCondition[] }, ctx: PlanContext): PlanningWarning[] {
  const out: PlanningWarning[] = [];
  const describe = (c: PlannedCondition) => `${ctx.speciesName(c.speciesId)} · ${ctx.resin(c.resinId)?.name ?? `resin ${c.resinId}`} · ${c.processLabel}`;

  plan.conditions.forEach((c, i) => {
    if (c.couponsWanted < MIN_COUPONS_PER_CONDITION) {
      out.push({
        code: 'few-coupons',
        conditionIndex: i,
        message: `${describe(c)}: ${c.couponsWanted} coupon${c.couponsWanted === 1 ? '' : 's'} is too few to see a difference from noise; plan at least ${MIN_COUPONS_PER_CONDITION}`,
      });
    }
    const resin = ctx.resin(c.resinId);
    if (resin && c.cureTempC != null && !inCureWindow(c.cureTempC, resin.cureMinC, resin.cureMaxC)) {
      const units = ctx.units ?? 'metric';
      out.push({
        code: 'cure-outside-window',
        conditionIndex: i,
        message: `${describe(c)}: a cure at ${formatTemperature(c.cureTempC, units, 2)} is outside ${resin.name}'s window of ${formatTemperatureRange(resin.cureMinC, resin.cureMaxC, units)}`,
      });
    }
    // Soak at least twice as long as the vacuum took (common practice, no published source).
    if (c.vacuumMinutes != null && c.soakMinutes != null && c.soakMinutes < 2 * c.vacuumMinutes) {
      out.push({
        code: 'short-soak',
        conditionIndex: i,
        message: `${describe(c)}: a ${c.soakMinutes} min soak is shorter than twice the ${c.vacuumMinutes} min vacuum`,
      });
    }
  });

  const speciesIds = [...new Set(plan.conditions.map((c) => c.speciesId))];
  const resinIds = [...new Set(plan.conditions.map((c) => c.resinId))];

  if (plan.controlsPerSpecies < 1) {
    for (const s of speciesIds) {
      out.push({
        code: 'no-controls',
        speciesId: s,
        message: `${ctx.speciesName(s)} has no untreated controls, so gains in hardness or stability cannot be told from the wood itself`,
      });
    }
  }

  const present = new Set(plan.conditions.map((c) => `${c.speciesId}:${c.resinId}`));
  for (const s of speciesIds) {
    for (const r of resinIds) {
      if (present.has(`${s}:${r}`)) continue;
      out.push({
        code: 'missing-cell',
        speciesId: s,
        resinId: r,
        message: `${ctx.speciesName(s)} is never treated with ${ctx.resin(r)?.name ?? `resin ${r}`}, so species and resin effects cannot be separated for it`,
      });
    }
  }
  return out;
}

/** The label of a condition as it reads on a coupon label and in the progress table. */
export function conditionLabel(speciesName: string, resinName: string, processLabel: string): string {
  return `${speciesName} · ${resinName} · ${processLabel}`;
}
