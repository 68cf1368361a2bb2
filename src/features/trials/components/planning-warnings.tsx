import type { PlanningWarning } from '../../../../shared/trials/planning';

/** Planning warnings in plain words. A warning never blocks a plan: the shop may have its reasons. */
export function PlanningWarnings({
  warnings,
  heading,
  headingLevel = 2,
}: {
  warnings: readonly Pick<PlanningWarning, 'code' | 'message'>[];
  heading: string;
  headingLevel?: 2 | 3;
}) {
  if (warnings.length === 0) return null;
  const H = headingLevel === 2 ? 'h2' : 'h3';
  return (
    <section aria-labelledby="planning-warnings-heading" className="mb-6 rounded border-2 border-amber-ink bg-paper px-4 py-3">
      <H id="planning-warnings-heading" className="mb-2 text-base font-semibold">
        {heading}
      </H>
      <ul className="list-disc space-y-1 pl-5 text-sm">
        {warnings.map((w, i) => (
          <li key={`${w.code}-${i}`}>
            <strong>Warning:</strong> {w.message}.
          </li>
        ))}
      </ul>
    </section>
  );
}
