import { and, eq, gte, isNull, or } from 'drizzle-orm';
import type { FeatureDeps } from '../../deps';
import { runStages, runs } from '../../db/schema/runs';
import type { WeighingStage } from '../../../shared/constants/records';
import { DomainError, reachedConstantMass } from '../../../shared/domain/index';
import type { BenchItem, BenchQuery } from '../../../shared/schemas/runs';
import { dueItems } from '../../../shared/runs/timers';
import { couponsOfRuns, getShopSettings, stagesOf } from './runs.repo';
import { toStageTimes } from './runs.service';

const HOUR = 3_600_000;
/** A finished run stays on the bench this long while coupons still wait for their cured weighing. */
const FINISHED_RUN_HORIZON_DAYS = 30;

/**
 * Today's work across all runs: stages whose planned end has passed or comes within the window, soaks
 * that reached their minimum, coupons waiting for the weighing the run's stage calls for, and drying
 * checks due. Not paginated: it is a short working list, sorted most urgent first.
 */
export function createBenchService(deps: FeatureDeps) {
  const { db } = deps.database;

  function bench(q: BenchQuery): { now: string; withinHours: number; items: BenchItem[] } {
    const now = deps.now();
    const t = now.getTime();
    const horizon = t + q.withinHours * HOUR;
    const settings = getShopSettings(db);
    const cutoff = new Date(t - FINISHED_RUN_HORIZON_DAYS * 24 * HOUR).toISOString();

    // Runs whose cure has not ended, or ended recently enough that a cured weighing may still be owed.
    const candidates = db
      .select({ id: runs.id, code: runs.code, cureEnd: runStages.endedAt })
      .from(runs)
      .leftJoin(runStages, and(eq(runStages.runId, runs.id), eq(runStages.stage, 'cure')))
      .where(or(isNull(runStages.endedAt), gte(runStages.endedAt, cutoff)))
      .all();
    const ids = candidates.map((r) => r.id);
    const allStages = stagesOf(db, ids);
    const allCoupons = couponsOfRuns(db, ids);
    const items: BenchItem[] = [];

    for (const run of candidates) {
      const stages = allStages.filter((s) => s.runId === run.id);
      const times = stages.map(toStageTimes);
      const has = (st: string) => stages.find((s) => s.stage === st);
      const runCoupons = allCoupons.filter((c) => c.runId === run.id);

      for (const d of dueItems(times, now).items) {
        if (Date.parse(d.dueAt) > horizon) continue;
        items.push({
          kind: d.kind,
          runId: run.id,
          runCode: run.code,
          couponId: null,
          couponTag: null,
          stage: d.stage,
          weighingStage: null,
          dueAt: d.dueAt,
          overdue: d.overdue,
          message: `${run.code}: ${d.message}`,
          target: { entity: 'run', id: run.id, form: 'stage', stage: d.stage },
        });
      }

      // The weighing the run's position calls for: dry before the vacuum, soaked once the soak is over
      // and before the oven, cured after the cure.
      const vacuum = has('vacuum');
      const soak = has('soak');
      const cure = has('cure');
      let wanted: WeighingStage | null = null;
      let why = '';
      if (!vacuum) {
        wanted = 'dry';
        why = 'before the vacuum';
      } else if (soak?.endedAt && !cure) {
        wanted = 'soaked';
        why = 'after draining, before the cure';
      } else if (cure?.endedAt) {
        wanted = 'cured';
        why = 'after the cure';
      }
      if (wanted !== null) {
        for (const c of runCoupons) {
          if (c.stagesWeighed.includes(wanted)) continue;
          items.push({
            kind: 'weighing-due',
            runId: run.id,
            runCode: run.code,
            couponId: c.id,
            couponTag: c.tag,
            stage: null,
            weighingStage: wanted,
            dueAt: null,
            overdue: false,
            message: `${c.tag} (${run.code}) needs a ${wanted} weighing ${why}`,
            target: { entity: 'coupon', id: c.id, form: 'weighing', stage: wanted },
          });
        }
      }

      const drying = has('drying');
      if (drying && drying.endedAt === null) {
        const rule = { minIntervalHours: settings.dryingMinIntervalHours, maxChangePct: settings.dryingMaxChangePct };
        for (const c of runCoupons) {
          let reached = false;
          try {
            reached = reachedConstantMass(c.dryingChecks, rule).reached;
          } catch (e) {
            if (!(e instanceof DomainError)) throw e;
          }
          if (reached) continue;
          const last = c.dryingChecks.map((d) => Date.parse(d.at)).sort((a, b) => b - a)[0];
          const dueAt = last === undefined ? null : last + rule.minIntervalHours * HOUR;
          if (dueAt !== null && dueAt > horizon) continue;
          items.push({
            kind: 'drying-check-due',
            runId: run.id,
            runCode: run.code,
            couponId: c.id,
            couponTag: c.tag,
            stage: 'drying',
            weighingStage: 'drying-check',
            dueAt: dueAt === null ? null : new Date(dueAt).toISOString(),
            overdue: dueAt === null || dueAt <= t,
            message:
              last === undefined
                ? `${c.tag} (${run.code}) has no drying check yet`
                : `${c.tag} (${run.code}) is due a drying check ${rule.minIntervalHours} h after the last one`,
            target: { entity: 'coupon', id: c.id, form: 'weighing', stage: 'drying-check' },
          });
        }
      }
    }

    // Most urgent first: things due now (no time, or overdue), then by time.
    const rank = (i: BenchItem) => (i.dueAt === null ? -Infinity : Date.parse(i.dueAt));
    items.sort((a, b) => rank(a) - rank(b) || a.runCode.localeCompare(b.runCode) || (a.couponTag ?? '').localeCompare(b.couponTag ?? ''));
    return { now: now.toISOString(), withinHours: q.withinHours, items };
  }

  return { bench };
}
