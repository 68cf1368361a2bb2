import type { FeatureDeps } from '../../deps';
import { createAuditMemo } from '../../db/audit-memo';
import { createRunMemo } from './run-memo';
import { DomainError, reachedConstantMass } from '../../../shared/domain/index';
import { BENCH_COUPONS_SHOWN, type BenchItem, type BenchQuery, type BenchResponse } from '../../../shared/schemas/runs';
import { dueItems } from '../../../shared/runs/timers';
import { benchCandidateRuns, couponsOfRuns, couponsWaitingOfRuns, getShopSettings, stagesOf, type StageRow } from './runs.repo';
import { toStageTimes } from './runs.service';

const HOUR = 3_600_000;

interface NotDry {
  id: number;
  tag: string;
  last: number | undefined;
}
/** A finished run stays on the bench this long while coupons still wait for their cured weighing. */
const FINISHED_RUN_HORIZON_DAYS = 30;

/**
 * Today's work across all runs: stages whose planned end has passed or comes within the window, soaks
 * that reached their minimum, coupons waiting for the weighing the run's stage calls for, and drying
 * checks due: one item per run and stage or weighing (never one per coupon), sorted most urgent first and
 * cut at `limit`.
 */
export function createBenchService(deps: FeatureDeps) {
  const { db } = deps.database;

  // Rebuilt after any write, or each minute for the time-based items: polled by every open Bench.
  const memo = createAuditMemo<BenchResponse>(db, { perMinute: true, max: 50 });

  function bench(q: BenchQuery): BenchResponse {
    return memo.get(`${q.withinHours}|${q.limit}`, deps.now(), () => compute(q));
  }

  // Per run still drying, its coupons not yet at constant mass with the time of their last drying check.
  // That depends only on the run's readings and the shop's drying rule, so it is kept until a write
  // touches the run (createRunMemo) or the rule changes: the minute's rebuild of Bench then only compares
  // times (it read and tested every coupon of every drying run each minute, 150+ ms at 100k coupons).
  const dryingMemo = createRunMemo<NotDry[]>(db);

  function notYetDry(runIds: number[], rule: { minIntervalHours: number; maxChangePct: number }): Map<number, NotDry[]> {
    const memo = dryingMemo.sync(JSON.stringify(rule));
    const missing = runIds.filter((id) => !memo.has(id));
    for (const id of missing) memo.set(id, []);
    for (const c of couponsOfRuns(db, missing)) {
      let reached = false;
      try {
        reached = reachedConstantMass(c.dryingChecks, rule).reached;
      } catch (e) {
        if (!(e instanceof DomainError)) throw e;
      }
      if (reached) continue;
      let last: number | undefined;
      for (const d of c.dryingChecks) {
        const at = Date.parse(d.at);
        if (last === undefined || at > last) last = at;
      }
      (memo.get(c.runId) as NotDry[]).push({ id: c.id, tag: c.tag, last });
    }
    return memo;
  }

  function compute(q: BenchQuery): BenchResponse {
    const now = deps.now();
    const t = now.getTime();
    const horizon = t + q.withinHours * HOUR;
    const settings = getShopSettings(db);
    const cutoff = new Date(t - FINISHED_RUN_HORIZON_DAYS * 24 * HOUR).toISOString();

    // Runs whose cure has not ended, or ended recently enough that a cured weighing may still be owed.
    const candidates = benchCandidateRuns(db, cutoff);
    const ids = candidates.map((r) => r.id);
    const stagesByRun = new Map<number, StageRow[]>();
    for (const st of stagesOf(db, ids)) {
      const list = stagesByRun.get(st.runId);
      if (list) list.push(st);
      else stagesByRun.set(st.runId, [st]);
    }
    const items: BenchItem[] = [];

    // The weighing each run's position calls for: dry before the vacuum, soaked once the soak is over
    // and before the oven, cured after the cure.
    const wantedOf = new Map<number, { stage: 'dry' | 'soaked' | 'cured'; why: string }>();
    const drying: number[] = [];
    for (const run of candidates) {
      const stages = stagesByRun.get(run.id) ?? [];
      const has = (st: string) => stages.find((s) => s.stage === st);
      const vacuum = has('vacuum');
      const soak = has('soak');
      const cure = has('cure');
      if (!vacuum) wantedOf.set(run.id, { stage: 'dry', why: 'before the vacuum' });
      else if (soak?.endedAt && !cure) wantedOf.set(run.id, { stage: 'soaked', why: 'after draining, before the cure' });
      else if (cure?.endedAt) wantedOf.set(run.id, { stage: 'cured', why: 'after the cure' });
      const dry = has('drying');
      if (dry && dry.endedAt === null) drying.push(run.id);
    }
    // Counts come from the results table in grouped queries; only runs still drying load their coupons'
    // drying checks, because the constant-mass rule needs each coupon's series.
    const waiting = couponsWaitingOfRuns(
      db,
      [...wantedOf.entries()].map(([runId, w]) => ({ runId, stage: w.stage })),
      BENCH_COUPONS_SHOWN,
    );
    const rule = { minIntervalHours: settings.dryingMinIntervalHours, maxChangePct: settings.dryingMaxChangePct };
    const notDry = notYetDry(drying, rule);

    for (const run of candidates) {
      const times = (stagesByRun.get(run.id) ?? []).map(toStageTimes);
      for (const d of dueItems(times, now).items) {
        if (Date.parse(d.dueAt) > horizon) continue;
        items.push({
          kind: d.kind,
          runId: run.id,
          runCode: run.code,
          couponId: null,
          couponTag: null,
          couponCount: 0,
          coupons: [],
          stage: d.stage,
          weighingStage: null,
          dueAt: d.dueAt,
          overdue: d.overdue,
          message: `${run.code}: ${d.message}`,
          target: { entity: 'run', id: run.id, form: 'stage', stage: d.stage },
        });
      }

      const wanted = wantedOf.get(run.id);
      const w = waiting.get(run.id);
      const first = w?.first[0];
      if (wanted && w && first) {
        items.push({
          kind: 'weighing-due',
          runId: run.id,
          runCode: run.code,
          couponId: first.id,
          couponTag: first.tag,
          couponCount: w.count,
          coupons: w.first,
          stage: null,
          weighingStage: wanted.stage,
          dueAt: null,
          overdue: false,
          message:
            w.count === 1
              ? `${first.tag} (${run.code}) needs a ${wanted.stage} weighing ${wanted.why}`
              : `${run.code}: ${w.count} coupons need a ${wanted.stage} weighing ${wanted.why}`,
          target: { entity: 'coupon', id: first.id, form: 'weighing', stage: wanted.stage },
        });
      }

      // Drying checks due: one item for the run, the most urgent coupon first.
      const due: { id: number; tag: string; dueAt: number | null; last: number | undefined }[] = [];
      for (const { id, tag, last } of notDry.get(run.id) ?? []) {
        const dueAt = last === undefined ? null : last + rule.minIntervalHours * HOUR;
        if (dueAt !== null && dueAt > horizon) continue;
        due.push({ id, tag, dueAt, last });
      }
      due.sort((a, b) => (a.dueAt ?? -Infinity) - (b.dueAt ?? -Infinity) || a.tag.localeCompare(b.tag));
      const head = due[0];
      if (head) {
        const earliest = head.dueAt;
        items.push({
          kind: 'drying-check-due',
          runId: run.id,
          runCode: run.code,
          couponId: head.id,
          couponTag: head.tag,
          couponCount: due.length,
          coupons: due.slice(0, BENCH_COUPONS_SHOWN).map((c) => ({ id: c.id, tag: c.tag })),
          stage: 'drying',
          weighingStage: 'drying-check',
          dueAt: earliest === null ? null : new Date(earliest).toISOString(),
          overdue: earliest === null || earliest <= t,
          message:
            due.length > 1
              ? `${run.code}: ${due.length} coupons are due a drying check`
              : head.last === undefined
                ? `${head.tag} (${run.code}) has no drying check yet`
                : `${head.tag} (${run.code}) is due a drying check ${rule.minIntervalHours} h after the last one`,
          target: { entity: 'coupon', id: head.id, form: 'weighing', stage: 'drying-check' },
        });
      }
    }

    // Most urgent first: things due now (no time, or overdue), then by time.
    const rank = (i: BenchItem) => (i.dueAt === null ? -Infinity : Date.parse(i.dueAt));
    items.sort((a, b) => rank(a) - rank(b) || a.runCode.localeCompare(b.runCode) || (a.couponTag ?? '').localeCompare(b.couponTag ?? ''));
    return { now: now.toISOString(), withinHours: q.withinHours, items: items.slice(0, q.limit), total: items.length };
  }

  return { bench };
}
