import { dateTime } from './time-text';
import type { z } from 'zod';
import type { ruleCheckSchema } from '../../../../shared/schemas/runs';
import type { CheckStatus, RunRule } from '../../../../shared/runs/checks';

type RuleCheck = z.infer<typeof ruleCheckSchema>;

export const RULE_LABELS: Record<RunRule, string> = {
  'dry-weighings': 'Dry weighings',
  'drying-constant-mass': 'Drying to constant mass',
  'lot-shelf-life': 'Resin lot shelf life',
  'soak-time': 'Soak at least twice the vacuum',
  'cure-temperature': 'Cure temperature in the window',
  'cure-time': 'Cure time',
};

const STATUS_STYLE: Record<CheckStatus, string> = {
  ok: 'border-moss text-moss',
  warn: 'border-amber-ink text-amber-ink',
  fail: 'border-margin text-margin',
  pending: 'border-rule text-ink-faint',
};

/** The status as a word in a bordered tag: the colour only repeats what the word says. */
export function StatusWord({ status }: { status: CheckStatus }) {
  return (
    <span className={`inline-block min-w-[4.5rem] rounded border px-1.5 text-center text-xs font-semibold uppercase tracking-wide ${STATUS_STYLE[status]}`}>
      {status}
    </span>
  );
}

// The reasons carry instants as ISO text; the bench reads them as local date and time.
function readableTimes(text: string): string {
  return text.replace(/\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(?::\d{2}(?:\.\d+)?)?Z/g, (iso) => dateTime(iso));
}

export function RuleChecks({ checks }: { checks: readonly RuleCheck[] }) {
  return (
    <ul className="divide-y divide-paper-edge">
      {checks.map((c) => (
        <li key={c.rule} className="flex gap-3 py-2">
          <span className="shrink-0 pt-0.5">
            <StatusWord status={c.status} />
          </span>
          <span>
            <span className="font-medium">{RULE_LABELS[c.rule]}.</span> <span className="text-ink-soft">{readableTimes(c.reason)}</span>
          </span>
        </li>
      ))}
    </ul>
  );
}
