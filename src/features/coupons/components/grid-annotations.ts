import type { WeighingStage } from '../../../../shared/constants/records';
import { weighingWarnings, type EntryWarning, type RunOfCoupon } from '../../../../shared/runs/contradictions';
import type { Trial } from '../../../../shared/schemas/trials';
import { ENTRY_COLUMNS, type RowModel } from './grid-model';

/** A condition as the grid shows it: a short code in the cell, the full name beside it for a reader and in the key. */
export interface ConditionTag {
  code: string;
  /** Resin × process settings (the species has its own column). */
  name: string;
  /** Species · resin · process, as the trial names it. */
  label: string;
}

/**
 * Short codes for the conditions of the trials in a grid: C1, C2… in the trial's own order of conditions, so
 * the same code means the same condition wherever the trial is shown. With coupons of several trials in one
 * grid (a run may mix them), the trial's code goes in front: "T-7 C2".
 */
export function conditionTags(trials: readonly Pick<Trial, 'id' | 'code' | 'conditions'>[]): Map<number, ConditionTag> {
  const out = new Map<number, ConditionTag>();
  const several = trials.length > 1;
  for (const t of trials) {
    t.conditions.forEach((c, i) => {
      out.set(c.id, {
        code: several ? `${t.code} C${i + 1}` : `C${i + 1}`,
        name: `${c.resinName}, ${c.processLabel}`,
        label: c.label,
      });
    });
  }
  return out;
}

const WEIGHING_COLUMNS = ENTRY_COLUMNS.filter((c): c is Extract<(typeof ENTRY_COLUMNS)[number], { source: 'weighing' }> => c.source === 'weighing');

/**
 * Weighings typed in the row that do not fit what the coupon's run has recorded (a cured weight while the
 * run is still drying, a soaked weight before the soak), in words, from the shared rule the forms use. A
 * warning, not a refusal: a weighing may be typed in late from paper, so the row can still be saved.
 * `run` is undefined while the run is still loading (no warning then), null when the coupon is in no run.
 */
export function rowEntryWarnings(model: RowModel, run: RunOfCoupon | null | undefined, now: string): string[] {
  if (run === undefined) return [];
  const stages = WEIGHING_COLUMNS.filter((c) => model.typed[c.id] !== undefined).map((c) => c.stage as WeighingStage);
  if (stages.length === 0) return [];
  const { coupon } = model;
  return weighingWarnings(stages.map((stage) => ({ couponId: coupon.id, tag: coupon.tag, role: coupon.role, stage, measuredAt: now, run }))).map(
    (w) => w.message,
  );
}

/**
 * The same warnings over the whole grid, grouped (forty cured weights typed while one run is drying make one
 * message naming the run and the coupons), for the list above the grid: the row's own note may be scrolled
 * out of view while typing. Rows whose run is still loading are left out until it arrives.
 */
export function gridEntryWarnings(
  models: readonly RowModel[],
  runOf: (coupon: RowModel['coupon']) => RunOfCoupon | null | undefined,
  now: string,
): (EntryWarning & { columnId: string })[] {
  // One pass per weighing column, so each warning knows the column it is about (to go to its cell).
  return WEIGHING_COLUMNS.flatMap((col) => {
    const entries = [];
    for (const model of models) {
      const run = runOf(model.coupon);
      if (run === undefined || model.typed[col.id] === undefined) continue;
      const { coupon } = model;
      entries.push({ couponId: coupon.id, tag: coupon.tag, role: coupon.role, stage: col.stage as WeighingStage, measuredAt: now, run });
    }
    return weighingWarnings(entries).map((w) => ({ ...w, columnId: col.id }));
  });
}
