import type { RunStage } from '../constants/records';
import { SOAK_TO_VACUUM_RATIO } from './thresholds';
import { STAGE_LABELS, stageMinutes, type StageTimes } from './stages';

export const DUE_KINDS = ['stage-end', 'soak-minimum'] as const;
export type DueKind = (typeof DUE_KINDS)[number];

export interface DueItem {
  kind: DueKind;
  stage: RunStage;
  /** ISO time the thing falls due. */
  dueAt: string;
  /** True when dueAt is at or before now. */
  overdue: boolean;
  message: string;
}

export interface DueSummary {
  /** The earliest item, overdue ones first. */
  next: DueItem | null;
  items: DueItem[];
}

const MINUTE = 60_000;

function plannedEnd(s: StageTimes): number | null {
  if (s.endedAt !== null || s.plannedMinutes == null) return null;
  return Date.parse(s.startedAt) + s.plannedMinutes * MINUTE;
}

/**
 * The earliest time the soak may end: the vacuum's length times the soak ratio (common practice,
 * no published source: soak at least twice as long as the vacuum took), counted from the vacuum's end.
 */
export function soakMinimumEnd(vacuum: StageTimes | undefined): number | null {
  const minutes = stageMinutes(vacuum);
  if (!vacuum?.endedAt || minutes === null) return null;
  return Date.parse(vacuum.endedAt) + SOAK_TO_VACUUM_RATIO * minutes * MINUTE;
}

/**
 * What a run waits for: the open stage's planned end (start + planned minutes) and, while soaking,
 * the earliest end that satisfies the soak rule. A cure's planned end is its "due end".
 */
export function dueItems(stages: readonly StageTimes[], now: Date): DueSummary {
  const items: DueItem[] = [];
  const t = now.getTime();
  const push = (kind: DueKind, stage: RunStage, at: number, message: string) =>
    items.push({ kind, stage, dueAt: new Date(at).toISOString(), overdue: at <= t, message });

  for (const s of stages) {
    const end = plannedEnd(s);
    if (end === null) continue;
    const label = STAGE_LABELS[s.stage];
    push('stage-end', s.stage, end, end <= t ? `${label} was planned to end; record its end time` : `${label} is planned to end`);
  }
  const soak = stages.find((s) => s.stage === 'soak');
  if (soak && soak.endedAt === null) {
    const min = soakMinimumEnd(stages.find((s) => s.stage === 'vacuum'));
    if (min !== null) {
      push(
        'soak-minimum',
        'soak',
        min,
        min <= t
          ? `The soak has reached ${SOAK_TO_VACUUM_RATIO} × the vacuum time; it may be drained`
          : `The soak reaches ${SOAK_TO_VACUUM_RATIO} × the vacuum time`,
      );
    }
  }
  items.sort((a, b) => Date.parse(a.dueAt) - Date.parse(b.dueAt));
  return { next: items[0] ?? null, items };
}
