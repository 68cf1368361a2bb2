/** A labelled progress bar; `value` 0–1, or null while the share is not yet known. */
export function ProgressBar({ label, value }: { label: string; value: number | null }) {
  const pct = value === null ? null : Math.round(value * 100);
  return (
    <div className="my-3" role="group" aria-label={label}>
      <div className="mb-1 flex justify-between text-sm text-ink-soft">
        <span>{label}</span>
        <span aria-hidden="true">{pct === null ? '' : `${pct} %`}</span>
      </div>
      <progress className="h-2 w-full accent-amber-ink" max={100} value={pct ?? undefined} aria-label={label}>
        {pct === null ? '' : `${pct} %`}
      </progress>
    </div>
  );
}
