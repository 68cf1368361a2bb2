import type { FeatureDeps } from '../../deps';
import type { Db } from '../../db/client';
import { writeAudit } from '../../db/audit';
import { createMeasurements } from '../../measurements/measurements';
import { refreshResults } from '../../measurements/results';
import { Conflict, NotFound, Unprocessable, ValidationFailed } from '../../http/errors';
import type { User } from '../../../shared/schemas/auth';
import type {
  BatchMeasurementsInput,
  CheckInput,
  CheckOut,
  CorrectCheckInput,
  CorrectWeighingInput,
  CouponDetail,
  CouponHistory,
  CouponExportQuery,
  CouponListQuery,
  CouponListRow,
  CouponRowList,
  CouponOut,
  CreateCouponInput,
  MeasurementWarning,
  UpdateCouponInput,
  WeighingInput,
  WeighingOut,
} from '../../../shared/schemas/coupons';
import { antiSwellForList, couponMetrics, type CouponMetrics } from '../../../shared/coupons/metrics';
import { sgPlausibility, sgWarningText } from '../../../shared/coupons/plausibility';
import { readingDateQuestion } from '../../../shared/schemas/dates';
import { conditionLabel } from '../../../shared/trials/planning';
import {
  allChecks,
  allWeighings,
  auditFor,
  controlsFor,
  currentChecks,
  currentWeighings,
  findCondition,
  findCoupon,
  findCouponByTag,
  findSpecies,
  findTrial,
  countCoupons,
  exportCouponRows,
  insertCoupon,
  listCouponRows,
  listCouponsWithNames,
  type CouponPageArgs,
  shopFirstRecordAt,
  photosOf,
  resinsFor,
  speciesByIds,
  updateCouponRow,
  type CheckRow,
  type CouponInsert,
  type CouponRow,
  type CouponWithNames,
  type ResinRow,
  type SpeciesRow,
  type WeighingRow,
} from './coupons.repo';

/** Rows per query while a CSV export is written. */
const EXPORT_PAGE = 500;

export function toWeighingOut(r: WeighingRow): WeighingOut {
  return {
    id: r.id,
    couponId: r.couponId,
    stage: r.stage,
    massG: r.massG,
    measuredAt: r.measuredAt,
    importId: r.importId,
    source: r.source,
    supersededBy: r.supersededBy,
    deletedAt: r.deletedAt,
    createdAt: r.createdAt,
    createdBy: r.createdBy,
  };
}

export function toCheckOut(r: CheckRow): CheckOut {
  return {
    id: r.id,
    couponId: r.couponId,
    kind: r.kind,
    stage: r.stage,
    measuredAt: r.measuredAt,
    lengthMm: r.lengthMm,
    widthMm: r.widthMm,
    thicknessMm: r.thicknessMm,
    volumeCm3: r.volumeCm3,
    hardnessValue: r.hardnessValue,
    hardnessScale: r.hardnessScale,
    moisturePct: r.moisturePct,
    method: r.method,
    importId: r.importId,
    source: r.source,
    supersededBy: r.supersededBy,
    deletedAt: r.deletedAt,
    createdAt: r.createdAt,
    createdBy: r.createdBy,
  };
}

function metricsOf(coupon: CouponRow, ws: WeighingRow[], cs: CheckRow[], resin: ResinRow | undefined): CouponMetrics {
  return couponMetrics({
    role: coupon.role,
    weighings: ws.map((w) => ({ stage: w.stage, massG: w.massG, measuredAt: w.measuredAt })),
    checks: cs,
    resin: resin ? { curedDensityGcm3: resin.curedDensityGcm3 } : null,
  });
}

/** Implausible but possible readings, which are kept and pointed out. */
export function warningsOf(metrics: CouponMetrics, sp: SpeciesRow | undefined): MeasurementWarning[] {
  const out: MeasurementWarning[] = [];
  if (metrics.drySg !== null && sp) {
    const p = sgPlausibility(metrics.drySg, sp);
    if (p && !p.plausible) out.push({ field: 'drySg', message: sgWarningText(metrics.drySg, p) });
  }
  if (metrics.voidFillPct !== null && metrics.voidFillPct > 100) {
    out.push({
      field: 'voidFillPct',
      message: `The void fill works out at ${metrics.voidFillPct.toFixed(0)} %, above 100 %: a resin film on the surface, a swollen piece or a weighing error`,
    });
  }
  for (const p of metrics.problems) out.push({ field: p.metric, message: p.message });
  return out;
}

function groupBy<T>(rows: readonly T[], key: (r: T) => number): Map<number, T[]> {
  const out = new Map<number, T[]>();
  for (const r of rows) {
    const k = key(r);
    const list = out.get(k);
    if (list) list.push(r);
    else out.set(k, [r]);
  }
  return out;
}

export function createCouponsService(deps: FeatureDeps) {
  const { db } = deps.database;
  const measurements = createMeasurements(deps);

  function speciesDensityOf(sp: SpeciesRow | undefined) {
    return {
      basicSg: sp?.basicSg ?? null,
      sg12: sp?.sg12 ?? null,
      measuredDensityKgM3: sp?.measuredDensityKgM3 ?? null,
      measuredMoisturePct: sp?.measuredMoisturePct ?? null,
      sgCoefficientOfVariation: sp?.sgCoefficientOfVariation ?? null,
    };
  }

  /** Coupon answers with computed metrics, warnings and ASE against the controls of their trial and species. */
  function build(tx: Db, rows: CouponWithNames[]): CouponOut[] {
    if (rows.length === 0) return [];
    const present = new Set(rows.map((r) => r.coupon.id));
    const pairs = new Map<string, { trialId: number; speciesId: number }>();
    for (const r of rows) {
      if (r.coupon.role === 'treated' && r.coupon.trialId !== null) {
        pairs.set(`${r.coupon.trialId}|${r.coupon.speciesId}`, { trialId: r.coupon.trialId, speciesId: r.coupon.speciesId });
      }
    }
    const extra = controlsFor(tx, [...pairs.values()]).filter((c) => !present.has(c.coupon.id));
    const all = [...rows, ...extra];
    const ids = all.map((r) => r.coupon.id);
    const ws = currentWeighings(tx, ids);
    const cs = currentChecks(tx, ids);
    const resinMap = resinsFor(
      tx,
      all.map((r) => r.coupon),
    );
    const spMap = speciesByIds(tx, [...new Set(all.map((r) => r.coupon.speciesId))]);
    const wsOf = groupBy(ws, (w) => w.couponId);
    const csOf = groupBy(cs, (c) => c.couponId);
    const computed = all.map((r) => {
      const mineW = wsOf.get(r.coupon.id) ?? [];
      const mineC = csOf.get(r.coupon.id) ?? [];
      const resin = resinMap.get(r.coupon.id);
      return { r, mineW, mineC, resin, metrics: metricsOf(r.coupon, mineW, mineC, resin) };
    });
    const firstRecordAt = shopFirstRecordAt(tx);
    const dateQuestions = (c: { mineW: WeighingRow[]; mineC: CheckRow[] }): MeasurementWarning[] =>
      [...c.mineW, ...c.mineC].flatMap((r) => {
        const q = readingDateQuestion(r.measuredAt, deps.now(), firstRecordAt);
        return q ? [{ field: 'measuredAt', message: q }] : [];
      });
    const ase = antiSwellForList(
      computed.map((c) => ({ trialId: c.r.coupon.trialId, speciesId: c.r.coupon.speciesId, role: c.r.coupon.role, metrics: c.metrics })),
    );
    return computed.slice(0, rows.length).map((c, i) => ({
      id: c.r.coupon.id,
      tag: c.r.coupon.tag,
      version: c.r.coupon.version,
      trialId: c.r.coupon.trialId,
      trialCode: c.r.trialCode,
      conditionId: c.r.coupon.conditionId,
      condition:
        c.r.coupon.conditionId !== null && c.r.processLabel !== null && c.r.plannedResinId !== null && c.r.plannedResinName !== null
          ? {
              id: c.r.coupon.conditionId,
              label: conditionLabel(c.r.conditionSpeciesName ?? c.r.speciesName, c.r.plannedResinName, c.r.processLabel),
              processLabel: c.r.processLabel,
              plannedResin: { id: c.r.plannedResinId, name: c.r.plannedResinName },
            }
          : null,
      speciesId: c.r.coupon.speciesId,
      speciesName: c.r.speciesName,
      speciesDensity: speciesDensityOf(spMap.get(c.r.coupon.speciesId)),
      role: c.r.coupon.role,
      sourceBoard: c.r.coupon.sourceBoard,
      runId: c.r.coupon.runId,
      runCode: c.r.runCode,
      notes: c.r.coupon.notes,
      createdAt: c.r.coupon.createdAt,
      resin: c.resin ? { id: c.resin.id, name: c.resin.name, curedDensityGcm3: c.resin.curedDensityGcm3, liquidDensityGcm3: c.resin.liquidDensityGcm3 } : null,
      weighings: c.mineW.map(toWeighingOut),
      checks: c.mineC.map(toCheckOut),
      metrics: c.metrics,
      antiSwell: ase[i] ?? null,
      warnings: [...warningsOf(c.metrics, spMap.get(c.r.coupon.speciesId)), ...dateQuestions(c)],
    }));
  }

  function requireCoupon(tx: Db, id: number): CouponWithNames {
    const c = findCoupon(tx, id);
    if (!c) throw new NotFound('Coupon');
    return c;
  }

  function one(tx: Db, id: number): CouponOut {
    return build(tx, [requireCoupon(tx, id)])[0] as CouponOut;
  }

  /** A cursor names the last row of a page: its sort value and id. */
  const encodeCursor = (v: unknown, id: number) => Buffer.from(JSON.stringify([v, id])).toString('base64url');
  function decodeCursor(cursor: string): [string | number, number] {
    try {
      const v = JSON.parse(Buffer.from(cursor, 'base64url').toString('utf8')) as unknown;
      if (Array.isArray(v) && v.length === 2 && (typeof v[0] === 'string' || typeof v[0] === 'number') && Number.isInteger(v[1]))
        return v as [string | number, number];
    } catch {
      // falls through to the refusal below
    }
    throw new ValidationFailed('That cursor is not one this list gave out', { after: ['Use the nextCursor of the previous page'] });
  }

  function pageArgs(q: CouponListQuery): CouponPageArgs {
    return { filters: q, after: q.after === undefined ? null : decodeCursor(q.after), limit: q.pageSize, offset: (q.page - 1) * q.pageSize };
  }

  /** The cursor after the last row, when the page is full (there may be more). */
  function nextCursorOf(rows: { id: number; sortValue: string | number | null }[], pageSize: number): string | null {
    const last = rows.at(-1);
    return last && rows.length === pageSize ? encodeCursor(last.sortValue, last.id) : null;
  }

  /** A page of the list as light rows: keys and the figures the list shows, one query plus the count. */
  function list(q: CouponListQuery): CouponRowList {
    const { rows, total } = listCouponRows(db, pageArgs(q));
    const items: CouponListRow[] = rows.map((r) => ({
      id: r.id,
      tag: r.tag,
      trialId: r.trialId,
      trialCode: r.trialCode,
      conditionId: r.conditionId,
      condition:
        r.conditionId !== null && r.processLabel !== null && r.plannedResinId !== null && r.plannedResinName !== null
          ? {
              id: r.conditionId,
              label: conditionLabel(r.conditionSpeciesName ?? r.speciesName, r.plannedResinName, r.processLabel),
              processLabel: r.processLabel,
              plannedResin: { id: r.plannedResinId, name: r.plannedResinName },
            }
          : null,
      speciesId: r.speciesId,
      speciesName: r.speciesName,
      role: r.role,
      sourceBoard: r.sourceBoard,
      runId: r.runId,
      runCode: r.runCode,
      createdAt: r.createdAt,
      dryMassG: r.dryMassG,
      soakedMassG: r.soakedMassG,
      curedMassG: r.curedMassG,
      drySg: r.drySg,
      wpgPct: r.wpgPct,
      resinLoadingKgM3: r.resinLoadingKgM3,
      voidFillPct: r.voidFillPct,
      problemCount: r.problemCount,
      firstProblem: r.firstProblem,
    }));
    return { items, page: q.page, pageSize: q.pageSize, total, nextCursor: nextCursorOf(rows, q.pageSize) };
  }

  /** The same page with the full answers (readings, warnings, ASE), for the entry grid. */
  function listFull(q: CouponListQuery): { items: CouponOut[]; page: number; pageSize: number; total: number; nextCursor: string | null } {
    const rows = listCouponsWithNames(db, pageArgs(q));
    const total = countCoupons(db, q);
    const nextCursor = nextCursorOf(
      rows.map((r) => ({ id: r.coupon.id, sortValue: r.sortValue })),
      q.pageSize,
    );
    return { items: build(db, rows), page: q.page, pageSize: q.pageSize, total, nextCursor };
  }

  /** Every coupon the list's filters match, a page at a time, as CSV rows after a header. */
  function* exportRows(q: CouponExportQuery): Generator<(string | number | null)[]> {
    yield [
      'tag',
      'trial',
      'condition',
      'species',
      'role',
      'run',
      'resin',
      'source_board',
      'dry_mass_g',
      'soaked_mass_g',
      'cured_mass_g',
      'dry_thickness_mm',
      'dry_volume_cm3',
      'mc_pct',
      'dry_density_kg_m3',
      'dry_sg',
      'wpg_pct',
      'resin_loading_kg_m3',
      'void_fill_pct',
      'cure_loss_pct',
      'bulking_pct',
      'swelling_pct',
      'problems',
      'notes',
      'created_at',
    ];
    for (let offset = 0; ; offset += EXPORT_PAGE) {
      const rows = exportCouponRows(db, q, EXPORT_PAGE, offset);
      for (const x of rows) {
        const r = x.r;
        yield [
          x.coupon.tag,
          x.trialCode,
          x.processLabel,
          x.speciesName,
          x.coupon.role,
          x.runCode,
          x.resinName,
          x.coupon.sourceBoard,
          r?.dryMassG ?? null,
          r?.soakedMassG ?? null,
          r?.curedMassG ?? null,
          r?.dryThicknessMm ?? null,
          r?.dryVolumeCm3 ?? null,
          r?.mcPct ?? null,
          r?.dryDensityKgM3 ?? null,
          r?.drySg ?? null,
          r?.wpgPct ?? null,
          r?.resinLoadingKgM3 ?? null,
          r?.voidFillPct ?? null,
          r?.cureLossPct ?? null,
          r?.bulkingPct ?? null,
          r?.swellingPct ?? null,
          r ? r.problems.map((p) => `${p.metric}: ${p.message}`).join('; ') : null,
          x.coupon.notes,
          x.coupon.createdAt,
        ];
      }
      if (rows.length < EXPORT_PAGE) return;
    }
  }

  function get(id: number): CouponDetail {
    return { ...one(db, id), photos: photosOf(db, id) };
  }

  function validateLinks(tx: Db, v: { speciesId: number; role: 'treated' | 'control'; trialId: number | null; conditionId: number | null }) {
    if (!findSpecies(tx, v.speciesId)) throw new Unprocessable(`No species with id ${v.speciesId}`, { speciesId: [`No species with id ${v.speciesId}`] });
    if (v.trialId !== null && !findTrial(tx, v.trialId))
      throw new Unprocessable(`No trial with id ${v.trialId}`, { trialId: [`No trial with id ${v.trialId}`] });
    if (v.conditionId !== null) {
      if (v.role === 'control') {
        const msg = 'A control coupon belongs to its trial and species, not to a treated condition';
        throw new Unprocessable(msg, { conditionId: [msg] });
      }
      const cond = findCondition(tx, v.conditionId);
      if (!cond) throw new Unprocessable(`No trial condition with id ${v.conditionId}`, { conditionId: [`No trial condition with id ${v.conditionId}`] });
      if (v.trialId !== null && cond.trialId !== v.trialId) {
        throw new Unprocessable('That condition belongs to another trial', { conditionId: ['That condition belongs to another trial'] });
      }
      if (cond.speciesId !== v.speciesId) {
        throw new Unprocessable('The condition is for another species', { speciesId: ['The condition is for another species'] });
      }
    }
  }

  function create(actor: User, input: CreateCouponInput): CouponDetail {
    const id = db.transaction((tx) => {
      if (findCouponByTag(tx, input.tag)) throw new Conflict(`A coupon tagged ${input.tag} already exists`, { tag: ['This tag is taken'] });
      let trialId = input.trialId ?? null;
      const conditionId = input.conditionId ?? null;
      if (trialId === null && conditionId !== null) trialId = findCondition(tx, conditionId)?.trialId ?? null;
      validateLinks(tx, { speciesId: input.speciesId, role: input.role, trialId, conditionId });
      const row = insertCoupon(tx, {
        tag: input.tag,
        speciesId: input.speciesId,
        role: input.role,
        trialId,
        conditionId,
        sourceBoard: input.sourceBoard ?? null,
        notes: input.notes ?? null,
        createdBy: actor.id,
      });
      writeAudit(tx, { actorId: actor.id, action: 'create', entity: 'coupon', entityId: row.id, after: row });
      refreshResults(tx, [row.id]);
      return row.id;
    });
    return get(id);
  }

  function update(actor: User, id: number, input: UpdateCouponInput): CouponDetail {
    db.transaction((tx) => {
      const before = requireCoupon(tx, id).coupon;
      // Last writer does not silently win: the edit was made on a version, and that must still be current.
      if (input.version !== before.version) {
        const msg = `Someone changed this coupon since you opened it (it is at version ${before.version}, your edit was made on ${input.version}); reload it and make your change again`;
        throw new Conflict(msg, { version: [msg] });
      }
      if (input.tag !== undefined && input.tag !== before.tag && findCouponByTag(tx, input.tag)) {
        throw new Conflict(`A coupon tagged ${input.tag} already exists`, { tag: ['This tag is taken'] });
      }
      const next = { speciesId: input.speciesId ?? before.speciesId, role: input.role ?? before.role };
      if (next.role === 'control' && before.runId !== null) {
        throw new Conflict('This coupon is in a run; a control goes in no run', { role: ['Remove the coupon from its run first'] });
      }
      if (next.role === 'control' && before.role !== 'control') {
        // A control is never soaked or cured: with resin weighings it would show a WPG it cannot have,
        // and be compared as untreated wood. Its readings stay as they are; the change is refused.
        const resinStages = [
          ...new Set(
            currentWeighings(tx, [id])
              .filter((w) => w.stage === 'soaked' || w.stage === 'cured')
              .map((w) => w.stage),
          ),
        ];
        if (resinStages.length > 0) {
          const msg = `This coupon has ${resinStages.join(' and ')} weighings, so it took up resin; a control never does. Delete those readings (with a reason) first if the coupon really was never treated`;
          throw new Conflict(msg, { role: [msg] });
        }
      }
      validateLinks(tx, { ...next, trialId: before.trialId, conditionId: before.conditionId });
      const set: Partial<CouponInsert> = { version: before.version + 1 };
      if (input.tag !== undefined) set.tag = input.tag;
      if (input.speciesId !== undefined) set.speciesId = input.speciesId;
      if (input.role !== undefined) set.role = input.role;
      if (input.sourceBoard !== undefined) set.sourceBoard = input.sourceBoard;
      if (input.notes !== undefined) set.notes = input.notes;
      const after = updateCouponRow(tx, id, set);
      writeAudit(tx, { actorId: actor.id, action: 'update', entity: 'coupon', entityId: id, before, after, reason: input.reason ?? null });
      refreshResults(tx, [id]);
    });
    return get(id);
  }

  function withWarnings<T>(tx: Db, couponId: number, extra: T) {
    const coupon = one(tx, couponId);
    return { ...extra, coupon, warnings: coupon.warnings };
  }

  function addWeighing(actor: User, couponId: number, input: WeighingInput) {
    return db.transaction((tx) => {
      requireCoupon(tx, couponId);
      const row = measurements.addWeighing(tx, actor, 'entry', couponId, input);
      return withWarnings(tx, couponId, { weighing: toWeighingOut(row) });
    });
  }

  function addCheck(actor: User, couponId: number, input: CheckInput) {
    return db.transaction((tx) => {
      requireCoupon(tx, couponId);
      const row = measurements.addCheck(tx, actor, 'entry', couponId, input);
      return withWarnings(tx, couponId, { check: toCheckOut(row) });
    });
  }

  function correctWeighing(actor: User, id: number, input: CorrectWeighingInput) {
    return db.transaction((tx) => {
      const { row, old } = measurements.correctWeighing(tx, actor, id, input);
      return withWarnings(tx, old.couponId, { weighing: toWeighingOut(row), superseded: toWeighingOut(old) });
    });
  }

  function correctCheck(actor: User, id: number, input: CorrectCheckInput) {
    return db.transaction((tx) => {
      const { row, old } = measurements.correctCheck(tx, actor, id, input);
      return withWarnings(tx, old.couponId, { check: toCheckOut(row), superseded: toCheckOut(old) });
    });
  }

  function deleteWeighing(actor: User, id: number, reason: string) {
    return db.transaction((tx) => {
      const { old } = measurements.deleteWeighing(tx, actor, id, reason);
      return { coupon: one(tx, old.couponId) };
    });
  }

  function deleteCheck(actor: User, id: number, reason: string) {
    return db.transaction((tx) => {
      const { old } = measurements.deleteCheck(tx, actor, id, reason);
      return { coupon: one(tx, old.couponId) };
    });
  }

  /**
   * The entry grid's save: every entry or none, errors naming `entries.<i>.<list>.<j>.<field>`.
   * Every reading is checked before giving up, so the grid can mark all its bad cells from one answer.
   */
  function batch(actor: User, input: BatchMeasurementsInput) {
    return db.transaction((tx) => {
      const { weighings: ws, checks: cs, couponIds } = measurements.batch(tx, actor, 'grid', input.entries);
      const out = build(
        tx,
        couponIds.map((id) => requireCoupon(tx, id)),
      );
      const byId = new Map(out.map((c) => [c.id, c]));
      const warnings = input.entries.flatMap((e, i) => (byId.get(e.couponId)?.warnings ?? []).map((w) => ({ ...w, entry: i, couponId: e.couponId })));
      return { written: { weighings: ws.length, checks: cs.length }, coupons: out, warnings };
    });
  }

  function history(id: number): CouponHistory {
    requireCoupon(db, id);
    const ws = allWeighings(db, id);
    const cs = allChecks(db, id);
    const ps = photosOf(db, id);
    const entries = auditFor(
      db,
      id,
      ws.map((w) => w.id),
      cs.map((c) => c.id),
      ps.map((p) => p.id),
      [...new Set([...ws.map((w) => w.importId), ...cs.map((c) => c.importId)].filter((i): i is number => i !== null))],
    );
    return {
      couponId: id,
      audit: entries.map(({ entry, actorName, actorEmail }) => ({
        id: entry.id,
        action: entry.action,
        entity: entry.entity,
        entityId: entry.entityId,
        before: entry.before,
        after: entry.after,
        reason: entry.reason,
        actorId: entry.actorId,
        actorName,
        actorEmail,
        createdAt: entry.createdAt,
      })),
      weighings: ws.map(toWeighingOut),
      checks: cs.map(toCheckOut),
    };
  }

  return { list, listFull, exportRows, get, create, update, addWeighing, addCheck, correctWeighing, correctCheck, deleteWeighing, deleteCheck, batch, history };
}
