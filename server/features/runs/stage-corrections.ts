import type { FeatureDeps } from '../../deps';
import { writeAudit } from '../../db/audit';
import { Conflict, NotFound, Unprocessable, ValidationFailed } from '../../http/errors';
import type { RunStage } from '../../../shared/constants/records';
import type { User } from '../../../shared/schemas/auth';
import type { CorrectStageInput, RunHistory } from '../../../shared/schemas/runs';
import { checkStage, STAGE_LABELS } from '../../../shared/runs/stages';
import { findRun, readingsOf, stagesOf, type ReadingRow, type StageRow } from './runs.repo';
import { convertReading, toStageTimes } from './runs.service';
import {
  deleteReadingRow,
  insertReadingRow,
  insertStageVersion,
  runAuditOf,
  stageVersionsOf,
  updateReadingRow,
  updateStageRow,
} from './stage-corrections.repo';

/** The recorded values of a stage, as a version keeps them. */
const STAGE_FIELDS = ['startedAt', 'endedAt', 'plannedMinutes', 'bubblingStoppedAt', 'barometerKpa', 'ovenSetC', 'ovenMeasuredC', 'notes'] as const;
type StageField = (typeof STAGE_FIELDS)[number];

function stageValues(s: StageRow): Record<StageField, unknown> {
  return Object.fromEntries(STAGE_FIELDS.map((f) => [f, s[f]])) as Record<StageField, unknown>;
}
function readingValues(r: ReadingRow) {
  return { id: r.id, at: r.at, gaugeValue: r.gaugeValue, gaugeUnit: r.gaugeUnit, absoluteKpa: r.absoluteKpa, percentVacuum: r.percentVacuum };
}

const hasOven = (s: RunStage) => s === 'drying' || s === 'cure';

/**
 * Corrections of a recorded stage: times, planned length, bubbling, oven temperatures, notes and gauge
 * readings, with a reason. The version the correction replaces is kept in run_stage_versions and the
 * change is audited with before, after and reason, all in one transaction; the stage's order against
 * its neighbours is checked as when it was recorded.
 */
export function createStageCorrections(deps: FeatureDeps) {
  const { db } = deps.database;

  function correct(actor: User, runId: number, stage: RunStage, input: CorrectStageInput): void {
    const label = STAGE_LABELS[stage];
    db.transaction((tx) => {
      const run = findRun(tx, runId);
      if (!run) throw new NotFound('Run');
      const stages = stagesOf(tx, [runId]);
      const existing = stages.find((s) => s.stage === stage);
      if (!existing) throw new NotFound(`${label} stage of run ${run.code}`);

      const fieldErrors: Record<string, string[]> = {};
      if (!hasOven(stage)) {
        for (const f of ['ovenSetC', 'ovenMeasuredC'] as const) if (input[f] != null) fieldErrors[f] = ['Oven temperatures belong to the drying or cure stage'];
      }
      if (stage !== 'vacuum' && input.bubblingStoppedAt != null) fieldErrors.bubblingStoppedAt = ['Bubbling is recorded at the vacuum stage'];
      if (stage !== 'vacuum' && input.barometerKpa != null)
        fieldErrors.barometerKpa = ['The barometer is recorded with the gauge readings, at the vacuum stage'];
      if (Object.keys(fieldErrors).length) throw new ValidationFailed('These values do not belong to this stage', fieldErrors);

      const merged = { ...stageValues(existing) } as Record<StageField, unknown>;
      for (const f of STAGE_FIELDS) if (input[f] !== undefined) merged[f] = input[f];
      const startedAt = merged.startedAt as string;
      const endedAt = (merged.endedAt as string | null) ?? null;
      const decision = checkStage(stages.map(toStageTimes), { stage, startedAt, endedAt });
      if (!decision.ok) {
        const Err = decision.impossible ? Unprocessable : Conflict;
        throw new Err(decision.reason, { [decision.field]: [decision.reason] });
      }
      const bubbling = (merged.bubblingStoppedAt as string | null) ?? null;
      if (bubbling !== null) {
        const t = Date.parse(bubbling);
        if (t < Date.parse(startedAt) || (endedAt !== null && t > Date.parse(endedAt))) {
          const msg = 'Bubbling stopped outside the vacuum stage’s start and end';
          throw new Unprocessable(msg, { bubblingStoppedAt: [msg] });
        }
      }

      const before = readingsOf(tx, runId).filter((r) => r.stage === stage);
      const byId = new Map(before.map((r) => [r.id, r]));
      const where = { altitudeM: run.altitudeM, barometerKpa: (merged.barometerKpa as number | null) ?? null };
      const barometerChanged = merged.barometerKpa !== existing.barometerKpa;
      const planned: { remove: number[]; change: { id: number; values: Partial<ReadingRow> }[] } = { remove: [], change: [] };
      (input.readings ?? []).forEach((c, i) => {
        const row = byId.get(c.id);
        if (!row)
          throw new Unprocessable(`No ${label.toLowerCase()} reading with id ${c.id} in this run`, { [`readings.${i}.id`]: ['Not a reading of this stage'] });
        if ('remove' in c) {
          planned.remove.push(c.id);
          return;
        }
        const next = { at: c.at ?? row.at, gaugeValue: c.gaugeValue ?? row.gaugeValue, gaugeUnit: c.gaugeUnit ?? row.gaugeUnit };
        if (next.at === row.at && next.gaugeValue === row.gaugeValue && next.gaugeUnit === row.gaugeUnit) return;
        planned.change.push({ id: c.id, values: { ...next, ...convertReading(next, where, `readings.${i}.gaugeValue`) } });
      });
      if (barometerChanged) {
        // Another ambient moves every reading of the stage the correction leaves as it was.
        const touched = new Set([...planned.remove, ...planned.change.map((c) => c.id)]);
        for (const row of before) {
          if (touched.has(row.id)) continue;
          const values = convertReading(row, where, 'barometerKpa');
          if (values.absoluteKpa !== row.absoluteKpa || values.percentVacuum !== row.percentVacuum) planned.change.push({ id: row.id, values });
        }
      }
      const added = (input.addReadings ?? []).map((r, i) => ({ ...r, ...convertReading(r, where, `addReadings.${i}.gaugeValue`) }));

      const changedFields = STAGE_FIELDS.filter((f) => merged[f] !== existing[f]);
      if (changedFields.length === 0 && planned.remove.length === 0 && planned.change.length === 0 && added.length === 0) {
        throw new ValidationFailed('Nothing to correct: every value is as recorded', { reason: ['Change at least one value'] });
      }

      insertStageVersion(tx, {
        runId,
        stageId: existing.id,
        stage,
        values: stageValues(existing),
        readings: before.map(readingValues),
        reason: input.reason,
        createdBy: actor.id,
      });
      const after = updateStageRow(tx, existing.id, Object.fromEntries(changedFields.map((f) => [f, merged[f]])) as Partial<StageRow>);
      for (const id of planned.remove) deleteReadingRow(tx, id);
      for (const c of planned.change) updateReadingRow(tx, c.id, c.values);
      for (const r of added) insertReadingRow(tx, { runId, stage, createdBy: actor.id, ...r });
      const readingsAfter = readingsOf(tx, runId).filter((r) => r.stage === stage);
      writeAudit(tx, {
        actorId: actor.id,
        action: 'correct',
        entity: 'run_stage',
        entityId: existing.id,
        before: { stage, ...stageValues(existing), readings: before.map(readingValues) },
        after: { stage, ...stageValues(after), readings: readingsAfter.map(readingValues) },
        reason: input.reason,
      });
    });
  }

  /** Every change to the run's record, newest first, and every replaced stage version. */
  function history(runId: number): RunHistory {
    const run = findRun(db, runId);
    if (!run) throw new NotFound('Run');
    const stages = stagesOf(db, [runId]);
    const stageOfId = new Map(stages.map((s) => [String(s.id), s.stage]));
    return {
      runId,
      entries: runAuditOf(
        db,
        runId,
        stages.map((s) => s.id),
      ).map(({ entry, actorName }) => ({
        id: entry.id,
        action: entry.action,
        entity: entry.entity,
        stage: entry.entity === 'run_stage' && entry.entityId !== null ? (stageOfId.get(entry.entityId) ?? null) : null,
        before: entry.before,
        after: entry.after,
        reason: entry.reason,
        actorName,
        createdAt: entry.createdAt,
      })),
      versions: stageVersionsOf(db, runId).map(({ version, actorName }) => ({
        id: version.id,
        stage: version.stage,
        values: version.values,
        readings: version.readings,
        reason: version.reason,
        replacedAt: version.createdAt,
        replacedBy: actorName,
      })),
    };
  }

  return { correct, history };
}
