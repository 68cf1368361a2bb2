import { RUN_STAGES, type RunStage } from '../constants/records';

/**
 * The chamber cycle as a state machine. Drying may happen outside the chamber (the shop's own oven
 * before the run) and draining may be skipped when the blanks go straight from the resin to the
 * wrap, so those two stages are optional; vacuum, soak and cure are what make a run a run.
 */
export const REQUIRED_STAGES: readonly RunStage[] = ['vacuum', 'soak', 'cure'];

export const STAGE_LABELS: Record<RunStage, string> = {
  drying: 'Drying',
  vacuum: 'Vacuum',
  soak: 'Soak',
  drain: 'Drain',
  cure: 'Cure',
};

/** What the machine needs to know about a recorded stage. Times are ISO strings. */
export interface StageTimes {
  stage: RunStage;
  startedAt: string;
  endedAt: string | null;
  plannedMinutes?: number | null;
}

export const RUN_STATUSES = ['planned', 'in-progress', 'finished'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];

export interface RunProgress {
  /** The latest stage that has started, or null before the first one. */
  current: RunStage | null;
  /** True while the current stage has no end time. */
  currentOpen: boolean;
  status: RunStatus;
}

const order = (s: RunStage) => RUN_STAGES.indexOf(s);

function byStage(stages: readonly StageTimes[]): Map<RunStage, StageTimes> {
  return new Map(stages.map((s) => [s.stage, s]));
}

export function runProgress(stages: readonly StageTimes[]): RunProgress {
  const sorted = [...stages].sort((a, b) => order(a.stage) - order(b.stage));
  const last = sorted.at(-1);
  if (!last) return { current: null, currentOpen: false, status: 'planned' };
  const finished = last.stage === 'cure' && last.endedAt !== null;
  return { current: last.stage, currentOpen: last.endedAt === null, status: finished ? 'finished' : 'in-progress' };
}

/**
 * `impossible` marks times that cannot be (an end before its start), as opposed to a stage that may not
 * be recorded yet in the cycle's order.
 */
export type StageDecision = { ok: true } | { ok: false; reason: string; field: string; impossible?: boolean };

/**
 * May `stage` be recorded (started, or its times changed) given the stages already recorded?
 * Rules: no stage may start while a later one has already started (the cycle only goes forward);
 * every required stage before it must have started and ended, and an optional one that was started
 * must have ended; it cannot start before the previous recorded stage ended; it cannot end before it
 * started. Updating a recorded stage is checked against its neighbours the same way.
 */
export function checkStage(recorded: readonly StageTimes[], next: { stage: RunStage; startedAt: string; endedAt: string | null }): StageDecision {
  const map = byStage(recorded);
  const idx = order(next.stage);
  const label = STAGE_LABELS[next.stage];
  const start = Date.parse(next.startedAt);
  if (next.endedAt !== null && Date.parse(next.endedAt) < start) {
    return { ok: false, field: 'endedAt', impossible: true, reason: `${label} cannot end before it started` };
  }
  const isUpdate = map.has(next.stage);

  if (!isUpdate) {
    const later = RUN_STAGES.slice(idx + 1).find((s) => map.has(s));
    if (later) {
      return {
        ok: false,
        field: 'stage',
        reason: `${label} cannot start: the ${STAGE_LABELS[later].toLowerCase()} stage has already started, and the cycle only goes forward`,
      };
    }
  }

  let previous: StageTimes | undefined;
  for (const s of RUN_STAGES.slice(0, idx)) {
    const rec = map.get(s);
    if (!rec) {
      if (REQUIRED_STAGES.includes(s)) {
        return { ok: false, field: 'stage', reason: `${label} cannot start before the ${STAGE_LABELS[s].toLowerCase()} stage has been recorded` };
      }
      continue;
    }
    if (rec.endedAt === null) {
      return { ok: false, field: 'stage', reason: `End the ${STAGE_LABELS[s].toLowerCase()} stage before starting ${label.toLowerCase()}` };
    }
    previous = rec;
  }
  if (previous?.endedAt && start < Date.parse(previous.endedAt)) {
    return {
      ok: false,
      field: 'startedAt',
      reason: `${label} cannot start before the ${STAGE_LABELS[previous.stage].toLowerCase()} stage ended (${previous.endedAt})`,
    };
  }

  if (isUpdate) {
    const following = RUN_STAGES.slice(idx + 1)
      .map((s) => map.get(s))
      .find((s): s is StageTimes => s !== undefined);
    if (following) {
      if (next.endedAt === null) {
        return {
          ok: false,
          field: 'endedAt',
          reason: `${label} needs an end time: the ${STAGE_LABELS[following.stage].toLowerCase()} stage has already started`,
        };
      }
      if (Date.parse(next.endedAt) > Date.parse(following.startedAt)) {
        return {
          ok: false,
          field: 'endedAt',
          reason: `${label} cannot end after the ${STAGE_LABELS[following.stage].toLowerCase()} stage started (${following.startedAt})`,
        };
      }
    }
  }
  return { ok: true };
}

/** Stages that may be started now, for the client to offer only the buttons that apply. */
export function startableStages(recorded: readonly StageTimes[], at: string): RunStage[] {
  const map = byStage(recorded);
  return RUN_STAGES.filter((s) => !map.has(s) && checkStage(recorded, { stage: s, startedAt: at, endedAt: null }).ok);
}

/** Duration of a stage in minutes, or null while it is open. */
export function stageMinutes(s: Pick<StageTimes, 'startedAt' | 'endedAt'> | undefined): number | null {
  if (!s || s.endedAt === null) return null;
  return (Date.parse(s.endedAt) - Date.parse(s.startedAt)) / 60_000;
}
