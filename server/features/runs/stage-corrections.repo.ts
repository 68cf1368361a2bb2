import { and, desc, eq, inArray, or } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { auditLog } from '../../db/schema/admin';
import { users } from '../../db/schema/auth';
import { runReadings, runStageVersions, runStages } from '../../db/schema/runs';
import type { ReadingRow, StageRow } from './runs.repo';

export type StageVersionRow = typeof runStageVersions.$inferSelect;

export function insertStageVersion(db: Db, values: typeof runStageVersions.$inferInsert): StageVersionRow {
  return db.insert(runStageVersions).values(values).returning().get();
}

export function updateStageRow(db: Db, id: number, values: Partial<StageRow>): StageRow {
  return db.update(runStages).set(values).where(eq(runStages.id, id)).returning().get();
}

export function updateReadingRow(db: Db, id: number, values: Partial<ReadingRow>): ReadingRow {
  return db.update(runReadings).set(values).where(eq(runReadings.id, id)).returning().get();
}

/** A reading taken back by a correction; its values stay in the stage version the correction keeps. */
export function deleteReadingRow(db: Db, id: number): void {
  db.delete(runReadings).where(eq(runReadings.id, id)).run();
}

export function insertReadingRow(db: Db, values: typeof runReadings.$inferInsert): ReadingRow {
  return db.insert(runReadings).values(values).returning().get();
}

/** Replaced versions of a run's stages, newest first, with the name of who replaced them. */
export function stageVersionsOf(db: Db, runId: number) {
  return db
    .select({ version: runStageVersions, actorName: users.name })
    .from(runStageVersions)
    .leftJoin(users, eq(runStageVersions.createdBy, users.id))
    .where(eq(runStageVersions.runId, runId))
    .orderBy(desc(runStageVersions.id))
    .all();
}

/** Audit entries about the run itself and its stages, newest first. */
export function runAuditOf(db: Db, runId: number, stageIds: number[]) {
  const aboutRun = and(eq(auditLog.entity, 'run'), eq(auditLog.entityId, String(runId)));
  const aboutStages = stageIds.length ? and(eq(auditLog.entity, 'run_stage'), inArray(auditLog.entityId, stageIds.map(String))) : undefined;
  return db
    .select({ entry: auditLog, actorName: users.name })
    .from(auditLog)
    .leftJoin(users, eq(auditLog.actorId, users.id))
    .where(aboutStages ? or(aboutRun, aboutStages) : aboutRun)
    .orderBy(desc(auditLog.id))
    .all();
}
