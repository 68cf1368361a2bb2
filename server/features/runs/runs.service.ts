import type { FeatureDeps } from '../../deps';
import { createAuditMemo } from '../../db/audit-memo';
import { createRunMemo } from './run-memo';
import type { Db } from '../../db/client';
import { writeAudit } from '../../db/audit';
import { refreshResults, refreshResultsOfRun } from '../../measurements/results';
import { Conflict, NotFound, Unprocessable, ValidationFailed } from '../../http/errors';
import { DomainError, WEATHER_ALLOWANCE, chamberPressure, standardPressureAtAltitude } from '../../../shared/domain/index';
import { convertPressure, type UnitChoice } from '../../../shared/units';
import type { User } from '../../../shared/schemas/auth';
import type {
  CreateRunInput,
  GaugeReadingInput,
  RecordStageInput,
  RunDetail,
  RunExportQuery,
  RunListQuery,
  RunStageOut,
  RunSummary,
  UpdateRunInput,
} from '../../../shared/schemas/runs';
import { RUN_STAGES, type RunStage } from '../../../shared/constants/records';
import { runChecks, type RuleCheck } from '../../../shared/runs/checks';
import { cautionsByStage } from '../../../shared/runs/cautions';
import { checkStage, runProgress, STAGE_LABELS, startableStages, type StageTimes } from '../../../shared/runs/stages';
import { dueItems } from '../../../shared/runs/timers';
import { insertReadingRow, updateReadingRow, updateStageRow } from './stage-corrections.repo';
import {
  couponCountsOfRuns,
  countRuns,
  listRunRows,
  countRunCodesStartingWith,
  couponsOfRuns,
  couponsWithTreatmentWeighings,
  findCouponsByIds,
  findLot,
  findRun,
  findRunByCode,
  getShopSettings,
  insertRun,
  insertStageRow,
  lotsByIds,
  photosOfRun,
  readingsOf,
  setCouponRun,
  stagesOf,
  updateRunRow,
  type LotWithResin,
  type RunCouponInfo,
  type RunInsert,
  type RunRow,
  type StageRow,
} from './runs.repo';

/** Rows per query while a CSV export is written. */
const EXPORT_PAGE = 200;

export function toStageTimes(s: StageRow): StageTimes & { ovenSetC: number | null; ovenMeasuredC: number | null } {
  return { stage: s.stage, startedAt: s.startedAt, endedAt: s.endedAt, plannedMinutes: s.plannedMinutes, ovenSetC: s.ovenSetC, ovenMeasuredC: s.ovenMeasuredC };
}

/** Where a gauge reading is taken: the run's altitude, and the shop's barometer when the stage recorded one. */
export interface Ambient {
  altitudeM: number;
  barometerKpa?: number | null;
}

/**
 * Gauge vacuum as read → absolute kPa and % vacuum, against the stage's barometer when it has one, else
 * the standard atmosphere at the run's altitude (U.S. Standard Atmosphere 1976), clamped at 0 within the
 * weather allowance.
 */
export function convertReading(r: Pick<GaugeReadingInput, 'gaugeValue' | 'gaugeUnit'>, where: Ambient, field: string) {
  const gaugeKpa = convertPressure(r.gaugeValue, r.gaugeUnit, 'kPa');
  try {
    const p = chamberPressure(gaugeKpa, where);
    return { absoluteKpa: p.absoluteKpa, percentVacuum: p.percentVacuum };
  } catch (e) {
    if (!(e instanceof DomainError)) throw e;
    if (e.code === 'vacuum-exceeds-ambient') {
      const { altitudeM, barometerKpa } = where;
      const against =
        barometerKpa != null
          ? `the shop's barometer reading of ${barometerKpa.toFixed(2)} kPa`
          : `the ${standardPressureAtAltitude(altitudeM).toFixed(2)} kPa standard ambient pressure at ${Math.round(altitudeM)} m (${Math.round(altitudeM / 0.3048)} ft)`;
      const check = barometerKpa != null ? 'check the gauge unit and the barometer reading' : "check the gauge unit and the run's altitude";
      const message = `${r.gaugeValue} ${r.gaugeUnit} (${gaugeKpa.toFixed(2)} kPa) is more vacuum than ${against} by more than the ${WEATHER_ALLOWANCE * 100} % the weather can add; ${check}`;
      throw new Unprocessable(`${field}: ${message}`, { [field]: [message] });
    }
    const f = e.field === 'barometerKpa' ? 'barometerKpa' : field;
    throw new Unprocessable(`${f}: ${e.message}`, { [f]: [e.message] });
  }
}

/** The ambient a stage's readings are subtracted from: its barometer, else the standard atmosphere at the altitude. */
export function stageAmbient(altitudeM: number, barometerKpa: number | null): { ambientKpa: number; ambientSource: 'barometer' | 'standard-atmosphere' } {
  return barometerKpa != null
    ? { ambientKpa: barometerKpa, ambientSource: 'barometer' }
    : { ambientKpa: standardPressureAtAltitude(altitudeM), ambientSource: 'standard-atmosphere' };
}

/** Recorded values that only a correction with a reason may change, and how close a resent value must be to count as the same. */
const RECORDED = {
  startedAt: { kind: 'time', words: 'start' },
  endedAt: { kind: 'time', words: 'end' },
  bubblingStoppedAt: { kind: 'time', words: 'time bubbling stopped' },
  barometerKpa: { kind: 'pressure', words: 'barometer reading' },
  ovenSetC: { kind: 'temperature', words: 'oven set point' },
  ovenMeasuredC: { kind: 'temperature', words: 'oven thermometer reading' },
} as const;
// A form shows times to the minute and temperatures to 0.1 °F or °C, so a resent value may differ from
// the stored one by that rounding; within it, the stored value stands untouched.
const SAME_TIME_MS = 60_000;
const SAME_TEMPERATURE_C = 0.1;
// A barometer is shown to 0.01 inHg (0.034 kPa) or 0.1 kPa at most coarsely; half the coarser step.
const SAME_PRESSURE_KPA = 0.05;

/**
 * Recording a stage again (to end it, add readings or fill a blank) may not change what is already
 * recorded: a resent value within the form's rounding keeps the stored one, anything else is refused
 * (409) with the way to change it, a correction with a reason.
 */
export function keepRecorded(existing: StageRow, merged: Pick<StageRow, keyof typeof RECORDED>): void {
  for (const [field, rule] of Object.entries(RECORDED) as [keyof typeof RECORDED, (typeof RECORDED)[keyof typeof RECORDED]][]) {
    const was = existing[field];
    const now = merged[field];
    if (was === null || now === was) continue;
    const close =
      now !== null &&
      (rule.kind === 'time'
        ? Math.abs(Date.parse(now as string) - Date.parse(was as string)) < SAME_TIME_MS
        : Math.abs((now as number) - (was as number)) <= (rule.kind === 'pressure' ? SAME_PRESSURE_KPA : SAME_TEMPERATURE_C));
    if (close) {
      (merged as Record<string, unknown>)[field] = was;
      continue;
    }
    const msg = `The ${STAGE_LABELS[existing.stage].toLowerCase()} ${rule.words} is already recorded; to change it, correct the stage and give the reason`;
    throw new Conflict(msg, { [field]: [msg] });
  }
}

export function createRunsService(deps: FeatureDeps) {
  const { db } = deps.database;

  /** settings: read once by a caller that checks many runs (the list), else here. */
  function checksFor(
    run: RunRow,
    stages: StageRow[],
    lot: LotWithResin | undefined,
    couponInfo: RunCouponInfo[],
    now: Date,
    units?: UnitChoice,
    s = getShopSettings(db),
  ): RuleCheck[] {
    return runChecks({
      stages: stages.map(toStageTimes),
      resin: lot ? { name: lot.resin.name, cureMinC: lot.resin.cureMinC, cureMaxC: lot.resin.cureMaxC, shelfLifeDays: lot.resin.shelfLifeDays } : null,
      lot: lot ? { code: lot.lot.code, activatedAt: lot.lot.activatedAt, status: lot.lot.status } : null,
      coupons: couponInfo.map((c) => ({
        id: c.id,
        tag: c.tag,
        thicknessMm: c.thicknessMm,
        hasDryWeighing: c.stagesWeighed.includes('dry'),
        dryingChecks: c.dryingChecks,
      })),
      dryingRule: { minIntervalHours: s.dryingMinIntervalHours, maxChangePct: s.dryingMaxChangePct },
      now,
      units,
    });
  }

  /** units: the reader's, for temperatures in the checks' reasons. */
  function detail(run: RunRow, units?: UnitChoice): RunDetail {
    const now = deps.now();
    const stages = stagesOf(db, [run.id]);
    const readings = readingsOf(db, run.id);
    const lot = run.resinLotId === null ? undefined : findLot(db, run.resinLotId);
    const couponInfo = couponsOfRuns(db, [run.id]);
    const times = stages.map(toStageTimes);
    const order = (st: RunStage) => RUN_STAGES.indexOf(st);
    const stageOut: RunStageOut[] = [...stages]
      .sort((a, b) => order(a.stage) - order(b.stage))
      .map((s) => ({
        stage: s.stage,
        startedAt: s.startedAt,
        endedAt: s.endedAt,
        plannedMinutes: s.plannedMinutes,
        plannedEndAt: s.plannedMinutes == null ? null : new Date(Date.parse(s.startedAt) + s.plannedMinutes * 60_000).toISOString(),
        bubblingStoppedAt: s.bubblingStoppedAt,
        barometerKpa: s.barometerKpa,
        ...stageAmbient(run.altitudeM, s.barometerKpa),
        ovenSetC: s.ovenSetC,
        ovenMeasuredC: s.ovenMeasuredC,
        notes: s.notes,
        readings: readings
          .filter((r) => r.stage === s.stage)
          .map((r) => ({
            id: r.id,
            stage: r.stage,
            at: r.at,
            gaugeValue: r.gaugeValue,
            gaugeUnit: r.gaugeUnit,
            absoluteKpa: r.absoluteKpa,
            percentVacuum: r.percentVacuum,
          })),
      }));
    return {
      id: run.id,
      code: run.code,
      chamber: run.chamber,
      resinLotId: run.resinLotId,
      lot: lot
        ? {
            id: lot.lot.id,
            code: lot.lot.code,
            activatedAt: lot.lot.activatedAt,
            status: lot.lot.status,
            reuseCount: lot.lot.reuseCount,
            resin: {
              id: lot.resin.id,
              name: lot.resin.name,
              liquidDensityGcm3: lot.resin.liquidDensityGcm3,
              curedDensityGcm3: lot.resin.curedDensityGcm3,
              cureMinC: lot.resin.cureMinC,
              cureMaxC: lot.resin.cureMaxC,
              shelfLifeDays: lot.resin.shelfLifeDays,
            },
          }
        : null,
      altitudeM: run.altitudeM,
      ambientKpa: standardPressureAtAltitude(run.altitudeM),
      notes: run.notes,
      createdAt: run.createdAt,
      createdBy: run.createdBy,
      stages: stageOut,
      progress: runProgress(times),
      startableStages: startableStages(times, now.toISOString()),
      coupons: couponInfo.map((c) => ({
        id: c.id,
        tag: c.tag,
        role: c.role,
        speciesId: c.speciesId,
        speciesName: c.speciesName,
        stagesWeighed: c.stagesWeighed,
      })),
      checks: checksFor(run, stages, lot, couponInfo, now, units),
      due: dueItems(times, now),
      cautions: cautionsByStage(),
      photos: photosOfRun(db, run.id),
    };
  }

  function requireRun(tx: Db, id: number): RunRow {
    const run = findRun(tx, id);
    if (!run) throw new NotFound('Run');
    return run;
  }

  function requireLot(tx: Db, lotId: number): void {
    if (!findLot(tx, lotId)) throw new Unprocessable('No resin lot with that id', { resinLotId: [`No resin lot with id ${lotId}`] });
  }

  function nextCode(tx: Db): string {
    const yy = String(deps.now().getUTCFullYear() % 100).padStart(2, '0');
    const prefix = `R${yy}-`;
    let n = countRunCodesStartingWith(tx, prefix) + 1;
    while (findRunByCode(tx, `${prefix}${String(n).padStart(3, '0')}`)) n++;
    return `${prefix}${String(n).padStart(3, '0')}`;
  }

  function addCoupons(tx: Db, actor: User, run: RunRow, ids: number[], field: string): void {
    if (ids.length === 0) return;
    const found = findCouponsByIds(tx, ids);
    const byId = new Map(found.map((c) => [c.id, c]));
    const missing = ids.filter((id) => !byId.has(id));
    if (missing.length) throw new Unprocessable(`No coupon with id ${missing.join(', ')}`, { [field]: [`No coupon with id ${missing.join(', ')}`] });
    const controls = found.filter((c) => c.role === 'control');
    if (controls.length) {
      const msg = `${controls.map((c) => c.tag).join(', ')}: control coupons stay untreated and go in no run`;
      throw new Unprocessable(msg, { [field]: [msg] });
    }
    const elsewhere = found.filter((c) => c.runId !== null && c.runId !== run.id);
    if (elsewhere.length) {
      const otherRuns = new Map(elsewhere.map((c) => [c.runId as number, findRun(tx, c.runId as number)?.code ?? String(c.runId)]));
      const msg = elsewhere.map((c) => `${c.tag} is already in run ${otherRuns.get(c.runId as number)}`).join('; ');
      throw new Conflict(msg, { [field]: [msg] });
    }
    for (const c of found) {
      if (c.runId === run.id) continue;
      setCouponRun(tx, c.id, run.id);
      writeAudit(tx, {
        actorId: actor.id,
        action: 'assign-run',
        entity: 'coupon',
        entityId: c.id,
        before: { runId: null },
        after: { runId: run.id, runCode: run.code },
      });
    }
    // The run's lot decides the resin of each coupon's results row.
    refreshResults(
      tx,
      found.map((c) => c.id),
    );
  }

  function removeCoupons(tx: Db, actor: User, run: RunRow, ids: number[]): void {
    if (ids.length === 0) return;
    const found = findCouponsByIds(tx, ids);
    const notHere = ids.filter((id) => found.find((c) => c.id === id)?.runId !== run.id);
    if (notHere.length) {
      const msg = `Coupon ${notHere.join(', ')} is not in run ${run.code}`;
      throw new Unprocessable(msg, { removeCouponIds: [msg] });
    }
    const treated = couponsWithTreatmentWeighings(tx, ids);
    if (treated.size) {
      const tags = found.filter((c) => treated.has(c.id)).map((c) => c.tag);
      const msg = `${tags.join(', ')} already have soaked or cured weighings from this run; delete those first if the coupon was never in it`;
      throw new Conflict(msg, { removeCouponIds: [msg] });
    }
    for (const c of found) {
      setCouponRun(tx, c.id, null);
      writeAudit(tx, {
        actorId: actor.id,
        action: 'remove-from-run',
        entity: 'coupon',
        entityId: c.id,
        before: { runId: run.id, runCode: run.code },
        after: { runId: null },
      });
    }
    refreshResults(
      tx,
      found.map((c) => c.id),
    );
  }

  // The rule checks' counts per run, remembered until a write touches that run (createRunMemo: its
  // coupons, their readings, its stages; a lot or the settings empty it). The clock enters the checks only
  // through the lot's age before the vacuum starts (shared/runs/checks.ts, lot-shelf-life), so a run
  // without a vacuum stage is also recounted each minute. The coupons' part (tags, dry weighings, drying
  // series, thickness: 25,000 coupons for a page of 50 full runs) is remembered apart, the same way.
  const countsMemo = createRunMemo<{ counts: RunSummary['checkCounts']; minute: number | null }>(db);
  const couponsMemo = createRunMemo<RunCouponInfo[]>(db);

  function couponInfoOf(runIds: number[]): Map<number, RunCouponInfo[]> {
    const memo = couponsMemo.sync();
    const missing = runIds.filter((id) => !memo.has(id));
    if (missing.length) {
      for (const id of missing) memo.set(id, []);
      for (const c of couponsOfRuns(db, missing)) (memo.get(c.runId) as RunCouponInfo[]).push(c);
    }
    return memo;
  }

  function checkCountsOf(rows: RunRow[], stagesByRun: Map<number, StageRow[]>, lots: Map<number, LotWithResin>, now: Date) {
    const minute = Math.floor(now.getTime() / 60_000);
    // A lot's dates and the shop's drying rule enter the counts too: their writes empty the memo (runsTouchedSince).
    const memo = countsMemo.sync();
    const missing = rows.filter((r) => {
      const hit = memo.get(r.id);
      return !hit || (hit.minute !== null && hit.minute !== minute);
    });
    if (missing.length) {
      const byRun = couponInfoOf(missing.map((r) => r.id));
      const settings = getShopSettings(db);
      for (const run of missing) {
        const lot = run.resinLotId === null ? undefined : lots.get(run.resinLotId);
        const stages = stagesByRun.get(run.id) ?? [];
        const counts = { ok: 0, warn: 0, fail: 0, pending: 0 };
        for (const c of checksFor(run, stages, lot, byRun.get(run.id) ?? [], now, undefined, settings)) counts[c.status]++;
        memo.set(run.id, { counts, minute: stages.some((st) => st.stage === 'vacuum') ? null : minute });
      }
    }
    return new Map(rows.map((r) => [r.id, (memo.get(r.id) as { counts: RunSummary['checkCounts'] }).counts]));
  }

  // Coupons per run of a page, remembered until the next write (a grouped count over up to 500 × page rows).
  const couponCountsMemo = createAuditMemo<Map<number, number>>(db, { max: 200 });

  function summaries(rows: RunRow[]): RunSummary[] {
    const ids = rows.map((r) => r.id);
    const stagesByRun = new Map<number, StageRow[]>();
    for (const st of stagesOf(db, ids)) {
      const list = stagesByRun.get(st.runId);
      if (list) list.push(st);
      else stagesByRun.set(st.runId, [st]);
    }
    const couponCounts = couponCountsMemo.get(ids.join(','), deps.now(), () => couponCountsOfRuns(db, ids));
    const lots = lotsByIds(
      db,
      rows.map((r) => r.resinLotId).filter((x): x is number => x !== null),
    );
    const now = deps.now();
    const counts = checkCountsOf(rows, stagesByRun, lots, now);
    return rows.map((run): RunSummary => {
      const stages = stagesByRun.get(run.id) ?? [];
      const lot = run.resinLotId === null ? undefined : lots.get(run.resinLotId);
      const times = stages.map(toStageTimes);
      const first = [...stages].sort((a, b) => a.startedAt.localeCompare(b.startedAt))[0];
      return {
        id: run.id,
        code: run.code,
        chamber: run.chamber,
        resinLotId: run.resinLotId,
        lotCode: lot?.lot.code ?? null,
        resinName: lot?.resin.name ?? null,
        altitudeM: run.altitudeM,
        couponCount: couponCounts.get(run.id) ?? 0,
        progress: runProgress(times),
        startedAt: first?.startedAt ?? null,
        nextDue: dueItems(times, now).next,
        checkCounts: counts.get(run.id) ?? { ok: 0, warn: 0, fail: 0, pending: 0 },
        createdAt: run.createdAt,
      };
    });
  }

  function list(q: RunListQuery): { items: RunSummary[]; page: number; pageSize: number; total: number } {
    const rows = listRunRows(db, q, q.pageSize, (q.page - 1) * q.pageSize);
    return { items: summaries(rows), page: q.page, pageSize: q.pageSize, total: countRuns(db, q) };
  }

  /** Every run the list's filters match, a page at a time, as CSV rows after a header. */
  function* exportRows(q: RunExportQuery): Generator<(string | number | null)[]> {
    yield [
      'code',
      'chamber',
      'resin',
      'lot',
      'altitude_m',
      'coupons',
      'stage',
      'started_at',
      'checks_ok',
      'checks_warn',
      'checks_fail',
      'checks_pending',
      'created_at',
    ];
    for (let offset = 0; ; offset += EXPORT_PAGE) {
      const rows = listRunRows(db, q, EXPORT_PAGE, offset);
      for (const r of summaries(rows)) {
        yield [
          r.code,
          r.chamber,
          r.resinName,
          r.lotCode,
          r.altitudeM,
          r.couponCount,
          r.progress.current,
          r.startedAt,
          r.checkCounts.ok,
          r.checkCounts.warn,
          r.checkCounts.fail,
          r.checkCounts.pending,
          r.createdAt,
        ];
      }
      if (rows.length < EXPORT_PAGE) return;
    }
  }

  function get(id: number, units?: UnitChoice): RunDetail {
    return detail(requireRun(db, id), units);
  }

  function create(actor: User, input: CreateRunInput): RunDetail {
    const id = db.transaction((tx) => {
      if (input.code && findRunByCode(tx, input.code)) throw new Conflict(`A run with code ${input.code} already exists`, { code: ['This code is taken'] });
      if (input.resinLotId != null) requireLot(tx, input.resinLotId);
      const altitudeM = input.altitudeM ?? getShopSettings(tx).altitudeM;
      const values = {
        code: input.code ?? nextCode(tx),
        chamber: input.chamber,
        resinLotId: input.resinLotId ?? null,
        altitudeM,
        notes: input.notes ?? null,
        createdBy: actor.id,
      };
      const row = insertRun(tx, values);
      writeAudit(tx, { actorId: actor.id, action: 'create', entity: 'run', entityId: row.id, after: row });
      addCoupons(tx, actor, row, input.couponIds ?? [], 'couponIds');
      return row.id;
    });
    return get(id, actor.unitSystem);
  }

  function update(actor: User, id: number, input: UpdateRunInput): RunDetail {
    db.transaction((tx) => {
      const before = requireRun(tx, id);
      if (input.code && input.code !== before.code && findRunByCode(tx, input.code)) {
        throw new Conflict(`A run with code ${input.code} already exists`, { code: ['This code is taken'] });
      }
      if (input.resinLotId != null) requireLot(tx, input.resinLotId);
      const set: Partial<RunInsert> = {};
      if (input.code !== undefined) set.code = input.code;
      if (input.chamber !== undefined) set.chamber = input.chamber;
      if (input.resinLotId !== undefined) set.resinLotId = input.resinLotId;
      if (input.altitudeM !== undefined) set.altitudeM = input.altitudeM;
      if (input.notes !== undefined) set.notes = input.notes;
      if (Object.keys(set).length) {
        const after = updateRunRow(tx, id, set);
        if (input.altitudeM !== undefined && input.altitudeM !== before.altitudeM) {
          // The absolute pressures were worked out at the old altitude; the gauge readings themselves
          // stand. Recorded results move, so the change needs a reason and goes on the run's history.
          const moved: { id: number; before: { absoluteKpa: number; percentVacuum: number }; after: { absoluteKpa: number; percentVacuum: number } }[] = [];
          // A stage with the shop's barometer does not depend on the altitude; its readings stay.
          const barometerOf = new Map(stagesOf(tx, [id]).map((st) => [st.stage, st.barometerKpa]));
          for (const r of readingsOf(tx, id)) {
            const next = convertReading(r, { altitudeM: input.altitudeM, barometerKpa: barometerOf.get(r.stage) ?? null }, 'altitudeM');
            updateReadingRow(tx, r.id, next);
            if (next.absoluteKpa !== r.absoluteKpa || next.percentVacuum !== r.percentVacuum) {
              moved.push({ id: r.id, before: { absoluteKpa: r.absoluteKpa, percentVacuum: r.percentVacuum }, after: next });
            }
          }
          if (moved.length > 0) {
            if (!input.reason) {
              const msg = `A new altitude moves the absolute pressure of ${moved.length} recorded gauge reading${moved.length === 1 ? '' : 's'}; say why in the reason`;
              throw new ValidationFailed(msg, { reason: [msg] });
            }
            writeAudit(tx, {
              actorId: actor.id,
              action: 'readings-recomputed',
              entity: 'run',
              entityId: id,
              before: { altitudeM: before.altitudeM, readings: moved.map((m) => ({ id: m.id, ...m.before })) },
              after: { altitudeM: input.altitudeM, readings: moved.map((m) => ({ id: m.id, ...m.after })) },
              reason: input.reason,
            });
          }
        }
        writeAudit(tx, { actorId: actor.id, action: 'update', entity: 'run', entityId: id, before, after, reason: input.reason ?? null });
        // Another lot may mean another resin: void fill and the maximum uptake of every coupon change.
        if (input.resinLotId !== undefined && input.resinLotId !== before.resinLotId) refreshResultsOfRun(tx, id);
      }
      const run = requireRun(tx, id);
      removeCoupons(tx, actor, run, input.removeCouponIds ?? []);
      addCoupons(tx, actor, run, input.addCouponIds ?? [], 'addCouponIds');
    });
    return get(id, actor.unitSystem);
  }

  function recordStage(actor: User, id: number, input: RecordStageInput): RunDetail {
    db.transaction((tx) => {
      const run = requireRun(tx, id);
      const stages = stagesOf(tx, [id]);
      const existing = stages.find((s) => s.stage === input.stage);
      const pick = <K extends keyof RecordStageInput & keyof StageRow>(k: K) => (input[k] !== undefined ? input[k] : (existing?.[k] ?? null)) as StageRow[K];
      const merged = {
        startedAt: input.startedAt,
        endedAt: pick('endedAt'),
        plannedMinutes: pick('plannedMinutes'),
        bubblingStoppedAt: pick('bubblingStoppedAt'),
        barometerKpa: pick('barometerKpa'),
        ovenSetC: pick('ovenSetC'),
        ovenMeasuredC: pick('ovenMeasuredC'),
        notes: pick('notes'),
      };
      if (existing) keepRecorded(existing, merged);
      const decision = checkStage(stages.map(toStageTimes), { stage: input.stage, startedAt: merged.startedAt, endedAt: merged.endedAt });
      if (!decision.ok) {
        const Err = decision.impossible ? Unprocessable : Conflict;
        throw new Err(decision.reason, { [decision.field]: [decision.reason] });
      }
      if (merged.bubblingStoppedAt !== null) {
        const t = Date.parse(merged.bubblingStoppedAt);
        if (t < Date.parse(merged.startedAt) || (merged.endedAt !== null && t > Date.parse(merged.endedAt))) {
          const msg = 'Bubbling stopped outside the vacuum stage’s start and end';
          throw new Unprocessable(msg, { bubblingStoppedAt: [msg] });
        }
      }
      const known = readingsOf(tx, id).filter((r) => r.stage === input.stage);
      // Entering the barometer after readings were worked out against the standard atmosphere would move
      // them: that is a correction of recorded results, with a reason.
      if (existing && existing.barometerKpa === null && merged.barometerKpa !== null && known.length > 0) {
        const msg = `The barometer would change the absolute pressure of ${known.length} recorded gauge reading${known.length === 1 ? '' : 's'}; to add it, correct the stage and give the reason`;
        throw new Conflict(msg, { barometerKpa: [msg] });
      }
      const where = { altitudeM: run.altitudeM, barometerKpa: merged.barometerKpa };
      const converted = (input.readings ?? []).map((r, i) => ({ ...r, ...convertReading(r, where, `readings.${i}.gaugeValue`) }));

      let row: StageRow;
      if (existing) {
        row = updateStageRow(tx, existing.id, merged);
      } else {
        row = insertStageRow(tx, { ...merged, runId: id, stage: input.stage, createdBy: actor.id });
      }
      const added = [];
      for (const r of converted) {
        // A resent form must not double the readings.
        if (known.some((k) => k.at === r.at && k.gaugeValue === r.gaugeValue && k.gaugeUnit === r.gaugeUnit)) continue;
        added.push(insertReadingRow(tx, { runId: id, stage: input.stage, createdBy: actor.id, ...r }));
      }
      writeAudit(tx, {
        actorId: actor.id,
        action: existing ? 'update' : 'create',
        entity: 'run_stage',
        entityId: row.id,
        before: existing ?? null,
        after: { ...row, readingsAdded: added },
      });
    });
    return get(id, actor.units);
  }

  function checks(id: number, units?: UnitChoice): { runId: number; checks: RuleCheck[] } {
    return { runId: id, checks: get(id, units).checks };
  }

  return { list, exportRows, get, create, update, recordStage, checks, detail, checksFor };
}
