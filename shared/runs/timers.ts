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
 * The soak rule, one definition for the timer and the rule check (common practice, no published
 * source: soak at least twice as long as the vacuum took). The soak is the soak stage as recorded,
 * from its own start to its own end, so time between the vacuum's end and the soak's start (blanks
 * moved, resin topped up) does not count; it must last at least SOAK_TO_VACUUM_RATIO × the vacuum
 * stage's length, and may therefore end from soak start + that length on.
 */
export interface SoakRequirement {
  vacuumMinutes: number;
  /** Shortest soak, minutes. */
  neededMinutes: number;
  /** Earliest time (ms since the epoch) the soak may end; null until the soak has started. */
  earliestEnd: number | null;
}

export function soakRequirement(
  vacuum: Pick<StageTimes, 'startedAt' | 'endedAt'> | undefined,
  soak: Pick<StageTimes, 'startedAt'> | undefined,
): SoakRequirement | null {
  const vacuumMinutes = stageMinutes(vacuum);
  if (vacuumMinutes === null) return null;
  const neededMinutes = SOAK_TO_VACUUM_RATIO * vacuumMinutes;
  return { vacuumMinutes, neededMinutes, earliestEnd: soak ? Date.parse(soak.startedAt) + neededMinutes * MINUTE : null };
}

/** The earliest time (ms) the soak may end under soakRequirement, or null when it cannot be known yet. */
export function soakMinimumEnd(vacuum: StageTimes | undefined, soak: StageTimes | undefined): number | null {
  return soakRequirement(vacuum, soak)?.earliestEnd ?? null;
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
    const min = soakMinimumEnd(
      stages.find((s) => s.stage === 'vacuum'),
      soak,
    );
    if (min !== null) {
      push(
        'soak-minimum',
        'soak',
        min,
        min <= t
          ? `The soak has lasted ${SOAK_TO_VACUUM_RATIO} × the vacuum time; it may be drained`
          : `The soak will have lasted ${SOAK_TO_VACUUM_RATIO} × the vacuum time`,
      );
    }
  }
  items.sort((a, b) => Date.parse(a.dueAt) - Date.parse(b.dueAt));
  return { next: items[0] ?? null, items };
}
