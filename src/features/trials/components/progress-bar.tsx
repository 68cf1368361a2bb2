import type { Progress } from '../../../../shared/schemas/trials';

/**
 * How far a condition has come, as a bar and the same numbers in words beside it, so the bar is
 * never the only carrier of the number. `done` counts coupons at their last weighing: after cure for
 * treated coupons, dry for untreated controls (they never go through the oven with resin).
 */
export function ProgressBar({ done, planned }: { done: number; planned: number }) {
  const pct = planned > 0 ? Math.min(100, Math.round((done / planned) * 100)) : 0;
  return (
    <div className="flex min-w-40 items-center gap-2">
      <div className="h-2.5 w-24 shrink-0 overflow-hidden rounded-sm border border-ink-faint bg-white" aria-hidden="true">
        <div className="h-full bg-moss" style={{ width: `${pct}%` }} />
      </div>
      <span className="text-xs whitespace-nowrap text-ink-soft">
        {done} of {planned} done ({pct} %)
      </span>
    </div>
  );
}

export const treatedDone = (p: Progress) => p.curedWeighed;
export const controlDone = (p: Progress) => p.dryWeighed;
