import { RUN_STAGES, type RunStage } from '../constants/records';

export interface Caution {
  id: string;
  title: string;
  text: string;
}

// Reminders in our own plain words. They are not a safety programme: the resin maker's data sheet and
// the local codes decide what is safe.

export const VACUUM_CAUTION: Caution = {
  id: 'vacuum-chamber',
  title: 'Vacuum chamber',
  text:
    'A chamber under vacuum can implode and throw pieces of the lid. Wear eye protection while it is under vacuum, ' +
    'and look the lid over for fine cracks or crazing before every run; retire a lid that shows any.',
};

export const CURE_OVEN_CAUTION: Caution = {
  id: 'cure-oven',
  title: 'Curing oven',
  text:
    'Cure in an oven kept only for this work and never used for food. Keep it ventilated and away from flames, ' +
    'sparks and other ignition sources: the monomer vapour that comes off during the cure is flammable.',
};

export const RESIN_HANDLING_CAUTION: Caution = {
  id: 'resin-handling',
  title: 'Resin and catalyst',
  text: 'Wear gloves and eye protection when mixing, pouring or draining resin, and when handling wet blanks.',
};

export const ALWAYS_CAUTION: Caution = {
  id: 'governing-rules',
  title: 'What governs',
  text:
    "Follow the resin's safety data sheet, local fire and building codes and licensed practice. " + 'This app only reminds; it does not make the work safe.',
};

const BY_STAGE: Record<RunStage, Caution[]> = {
  drying: [],
  vacuum: [VACUUM_CAUTION, RESIN_HANDLING_CAUTION],
  soak: [RESIN_HANDLING_CAUTION],
  drain: [RESIN_HANDLING_CAUTION],
  cure: [CURE_OVEN_CAUTION, RESIN_HANDLING_CAUTION],
};

/** The cautions to show at a stage, always ending with the reminder of what governs. */
export function cautionsForStage(stage: RunStage): Caution[] {
  return [...BY_STAGE[stage], ALWAYS_CAUTION];
}

export function cautionsByStage(): Record<RunStage, Caution[]> {
  return Object.fromEntries(RUN_STAGES.map((s) => [s, cautionsForStage(s)])) as Record<RunStage, Caution[]>;
}
