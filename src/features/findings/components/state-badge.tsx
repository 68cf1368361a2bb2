import { FINDING_STATE_LABELS, type FindingState } from '../../../../shared/constants/findings';

const TONE: Record<FindingState, string> = {
  draft: 'border-rule text-ink-soft',
  'in-review': 'border-amber-ink text-amber-ink',
  returned: 'border-margin text-margin',
  approved: 'border-moss text-moss',
  withdrawn: 'border-rule text-ink-faint',
};

/** The review state in words (never colour alone). */
export function StateBadge({ state }: { state: FindingState }) {
  return <span className={`inline-block rounded border bg-paper px-2 py-0.5 text-xs font-semibold ${TONE[state]}`}>{FINDING_STATE_LABELS[state]}</span>;
}
