import type { Db } from '../../db/client';
import { writeAudit } from '../../db/audit';
import { refreshResults } from '../../measurements/results';
import { Conflict, NotFound, Unprocessable } from '../../http/errors';
import type { User } from '../../../shared/schemas/auth';
import type { UnitChoice } from '../../../shared/units';
import type {
  ConditionInput,
  CreateTrialCouponsResponse,
  CreateTrialInput,
  LabelSheet,
  Progress,
  Trial,
  TrialExportQuery,
  TrialListQuery,
  TrialSummary,
  UpdateTrialInput,
} from '../../../shared/schemas/trials';
import { conditionLabel, planningWarnings } from '../../../shared/trials/planning';
import { assignCodes, controlTag, parseTag, resinCode, speciesCode, treatedTag, trialCode, trialCounter } from '../../../shared/trials/tags';
import * as repo from './trials.repo';
import { createAuditMemo } from '../../db/audit-memo';
import type { TrialRow } from './trials.repo';

/** Rows per query while a CSV export is written. */
const EXPORT_PAGE = 200;
import { labelAddress } from '../../../shared/trials/label-address';
import { readShopSettings } from '../../db/shop-settings';

export interface TrialsServiceDeps {
  db: Db;
  now: () => Date;
  /** Base URL of the app; a label's QR code opens `${base}/coupons/<id>`, base being the shop's label address or else this. */
  appUrl: string;
}

type List<T> = { items: T[]; page: number; pageSize: number; total: number };

const emptyProgress = (planned: number): Progress => ({ planned, created: 0, dryWeighed: 0, curedWeighed: 0 });
const conditionKey = (c: { speciesId: number; resinId: number; processLabel: string }) => `${c.speciesId}:${c.resinId}:${c.processLabel.trim().toLowerCase()}`;

function conditionValues(c: ConditionInput) {
  return {
    speciesId: c.speciesId,
    resinId: c.resinId,
    processLabel: c.processLabel,
    vacuumMinutes: c.vacuumMinutes ?? null,
    soakMinutes: c.soakMinutes ?? null,
    cureTempC: c.cureTempC ?? null,
    cureMinutes: c.cureMinutes ?? null,
    thicknessMm: c.thicknessMm ?? null,
    couponsWanted: c.couponsWanted,
  };
}

export function createTrialsService(deps: TrialsServiceDeps) {
  const { db } = deps;

  /** Every species and resin a condition names must exist; the answer names the condition's field. */
  function checkReferences(tx: Db, conditions: readonly ConditionInput[]) {
    const species = repo.speciesNames(tx, [...new Set(conditions.map((c) => c.speciesId))]);
    const resins = repo.resinsById(tx, [...new Set(conditions.map((c) => c.resinId))]);
    const fieldErrors: Record<string, string[]> = {};
    conditions.forEach((c, i) => {
      if (!species.has(c.speciesId)) fieldErrors[`conditions.${i}.speciesId`] = [`No species with id ${c.speciesId}`];
      if (!resins.has(c.resinId)) fieldErrors[`conditions.${i}.resinId`] = [`No resin with id ${c.resinId}`];
    });
    const first = Object.entries(fieldErrors)[0];
    if (first) throw new Unprocessable(`${first[0]}: ${first[1][0]}`, fieldErrors);
  }

  function nextCode(tx: Db): string {
    const year = deps.now().getUTCFullYear();
    const prefix = trialCode(year, 0).slice(0, 4);
    const highest = Math.max(0, ...repo.trialCodesLike(tx, prefix).map((c) => trialCounter(c, year) ?? 0));
    return trialCode(year, highest + 1);
  }

  /** units: the reader's, for temperatures in the planning warnings. */
  function getTrial(id: number, tx: Db = db, units?: UnitChoice): Trial {
    const t = repo.findTrial(tx, id);
    if (!t) throw new NotFound('Trial');
    const conditions = repo.conditionsOf(tx, id);
    const counts = repo.progressRows(tx, id);

    const conditionProgress = new Map<number, Progress>();
    const controlProgress = new Map<number, Progress>();
    for (const c of conditions) conditionProgress.set(c.id, emptyProgress(c.couponsWanted));
    const speciesInGrid = new Map(conditions.map((c) => [c.speciesId, c.speciesName]));
    for (const s of speciesInGrid.keys()) controlProgress.set(s, emptyProgress(t.controlsPerSpecies));
    const totals = emptyProgress(conditions.reduce((n, c) => n + c.couponsWanted, 0) + speciesInGrid.size * t.controlsPerSpecies);

    const add = (p: Progress, r: { created: number; dryWeighed: number | null; curedWeighed: number | null }) => {
      p.created += r.created;
      p.dryWeighed += Number(r.dryWeighed ?? 0);
      p.curedWeighed += Number(r.curedWeighed ?? 0);
    };
    for (const r of counts) {
      add(totals, r);
      if (r.conditionId !== null) {
        const p = conditionProgress.get(r.conditionId);
        if (p) add(p, r);
      } else if (r.role === 'control') {
        // A control of a species that has since left the grid still counts, with nothing planned.
        let p = controlProgress.get(r.speciesId);
        if (!p) {
          p = emptyProgress(0);
          controlProgress.set(r.speciesId, p);
        }
        add(p, r);
      }
    }
    const extraSpecies = [...controlProgress.keys()].filter((s) => !speciesInGrid.has(s));
    const extraNames = repo.speciesNames(tx, extraSpecies);

    const resinMap = new Map(conditions.map((c) => [c.resinId, { name: c.resinName, cureMinC: c.cureMinC, cureMaxC: c.cureMaxC }]));
    const warnings = planningWarnings(
      { controlsPerSpecies: t.controlsPerSpecies, conditions },
      { speciesName: (s) => speciesInGrid.get(s) ?? `species ${s}`, resin: (r) => resinMap.get(r), units },
    );

    return {
      id: t.id,
      code: t.code,
      title: t.title,
      question: t.question,
      status: t.status,
      controlsPerSpecies: t.controlsPerSpecies,
      notes: t.notes,
      createdAt: t.createdAt,
      conditionCount: conditions.length,
      couponCount: totals.created,
      speciesCount: new Set(conditions.map((c) => c.speciesId)).size,
      resinCount: new Set(conditions.map((c) => c.resinId)).size,
      plannedCount: totals.planned,
      // A treated coupon is done once weighed after cure; a control once weighed dry (it never sees resin).
      doneCount: [...conditionProgress.values()].reduce((n, p) => n + p.curedWeighed, 0) + [...controlProgress.values()].reduce((n, p) => n + p.dryWeighed, 0),
      conditions: conditions.map((c) => ({
        id: c.id,
        speciesId: c.speciesId,
        speciesName: c.speciesName,
        resinId: c.resinId,
        resinName: c.resinName,
        processLabel: c.processLabel,
        label: conditionLabel(c.speciesName, c.resinName, c.processLabel),
        vacuumMinutes: c.vacuumMinutes,
        soakMinutes: c.soakMinutes,
        cureTempC: c.cureTempC,
        cureMinutes: c.cureMinutes,
        thicknessMm: c.thicknessMm,
        couponsWanted: c.couponsWanted,
        progress: conditionProgress.get(c.id)!,
      })),
      controls: [...controlProgress.entries()].map(([speciesId, progress]) => ({
        speciesId,
        speciesName: speciesInGrid.get(speciesId) ?? extraNames.get(speciesId) ?? `species ${speciesId}`,
        progress,
      })),
      totals,
      warnings,
      runs: repo.runsOfTrial(tx, id),
    };
  }

  // Progress counts of a page of trials, remembered until the next write.
  const countsMemo = createAuditMemo<{ grids: ReturnType<typeof repo.gridCountsOf>; counts: ReturnType<typeof repo.couponCountsOf> }>(db, { max: 200 });

  /** One summary per trial row: grid and progress counts in two grouped queries for the whole page. */
  function summaries(rows: TrialRow[]): TrialSummary[] {
    const ids = rows.map((t) => t.id);
    const key = ids.join(',');
    const { grids, counts } = countsMemo.get(key, deps.now(), () => ({ grids: repo.gridCountsOf(db, ids), counts: repo.couponCountsOf(db, ids) }));
    return rows.map((t) => {
      const g = grids.get(t.id) ?? { conditions: 0, species: 0, resins: 0, wanted: 0 };
      const c = counts.get(t.id) ?? { created: 0, done: 0 };
      return {
        id: t.id,
        code: t.code,
        title: t.title,
        question: t.question,
        status: t.status,
        controlsPerSpecies: t.controlsPerSpecies,
        conditionCount: g.conditions,
        couponCount: c.created,
        speciesCount: g.species,
        resinCount: g.resins,
        plannedCount: Number(g.wanted) + g.species * t.controlsPerSpecies,
        doneCount: c.done,
        createdAt: t.createdAt,
      };
    });
  }

  function listTrials(q: TrialListQuery): List<TrialSummary> {
    const { rows, total } = repo.listTrials(db, q);
    return { items: summaries(rows.map((r) => r.trial)), page: q.page, pageSize: q.pageSize, total };
  }

  /** Every trial the list's filters match, a page at a time, as CSV rows after a header. */
  function* exportRows(q: TrialExportQuery): Generator<(string | number | null)[]> {
    yield ['code', 'title', 'status', 'question', 'conditions', 'species', 'resins', 'planned', 'coupons', 'done', 'created_at'];
    for (let page = 1; ; page++) {
      const { rows } = repo.listTrials(db, { ...q, page, pageSize: EXPORT_PAGE });
      for (const t of summaries(rows.map((r) => r.trial))) {
        yield [t.code, t.title, t.status, t.question, t.conditionCount, t.speciesCount, t.resinCount, t.plannedCount, t.couponCount, t.doneCount, t.createdAt];
      }
      if (rows.length < EXPORT_PAGE) return;
    }
  }

  function createTrial(actor: Pick<User, 'id'>, input: CreateTrialInput): Trial {
    return db.transaction((tx) => {
      checkReferences(tx, input.conditions);
      const trial = repo.insertTrial(tx, {
        code: nextCode(tx),
        title: input.title,
        question: input.question,
        controlsPerSpecies: input.controlsPerSpecies,
        notes: input.notes ?? null,
        createdBy: actor.id,
      });
      for (const c of input.conditions) repo.insertCondition(tx, { ...conditionValues(c), trialId: trial.id, createdBy: actor.id });
      const created = getTrial(trial.id, tx);
      writeAudit(tx, { actorId: actor.id, action: 'create', entity: 'trial', entityId: trial.id, after: { ...trial, conditions: input.conditions } });
      return created;
    });
  }

  function updateTrial(actor: Pick<User, 'id'>, id: number, input: UpdateTrialInput): Trial {
    return db.transaction((tx) => {
      const before = repo.findTrial(tx, id);
      if (!before) throw new NotFound('Trial');
      const { conditions, ...fields } = input;
      const changesPlan = conditions !== undefined || Object.keys(fields).some((k) => k !== 'status');
      if (before.status === 'closed' && changesPlan) {
        throw new Conflict('This trial is closed; reopen it (change its status) before changing the plan', { status: ['The trial is closed'] });
      }
      const existing = repo.conditionsOf(tx, id);
      if (Object.keys(fields).length) repo.updateTrialRow(tx, id, { ...fields, notes: fields.notes === undefined ? before.notes : fields.notes });

      if (conditions) {
        checkReferences(tx, conditions);
        const byKey = new Map(existing.map((c) => [conditionKey(c), c]));
        const kept = new Set<number>();
        for (const c of conditions) {
          const match = byKey.get(conditionKey(c));
          if (match) {
            kept.add(match.id);
            repo.updateConditionRow(tx, match.id, conditionValues(c));
          } else {
            repo.insertCondition(tx, { ...conditionValues(c), trialId: id, createdBy: actor.id });
          }
        }
        const removed = existing.filter((c) => !kept.has(c.id));
        const counts = repo.couponCountsByCondition(
          tx,
          removed.map((c) => c.id),
        );
        const blocked = removed.filter((c) => (counts.get(c.id) ?? 0) > 0);
        if (blocked.length) {
          const names = blocked.map((c) => `${conditionLabel(c.speciesName, c.resinName, c.processLabel)} (${counts.get(c.id)} coupons)`);
          const message = `A condition that already has coupons cannot be removed: ${names.join('; ')}`;
          throw new Conflict(message, { conditions: [message] });
        }
        repo.deleteConditions(
          tx,
          removed.map((c) => c.id),
        );
      }
      const after = repo.findTrial(tx, id)!;
      writeAudit(tx, {
        actorId: actor.id,
        action: 'update',
        entity: 'trial',
        entityId: id,
        before: { ...before, conditions: existing.map(({ speciesName: _s, resinName: _r, cureMinC: _a, cureMaxC: _b, ...c }) => c) },
        after: { ...after, ...(conditions ? { conditions } : {}) },
      });
      return getTrial(id, tx);
    });
  }

  /**
   * Creates the planned coupons that do not exist yet, in one transaction: all of them or none.
   * Calling it again creates nothing; raising couponsWanted or controlsPerSpecies and calling it
   * again creates only the difference, numbered on from the existing tags.
   */
  function createPlannedCoupons(actor: Pick<User, 'id'>, id: number): CreateTrialCouponsResponse {
    return db.transaction((tx) => {
      const trial = repo.findTrial(tx, id);
      if (!trial) throw new NotFound('Trial');
      if (trial.status === 'closed') throw new Conflict('This trial is closed; no coupons are added to it', { status: ['The trial is closed'] });
      const conditions = repo.conditionsOf(tx, id);
      const existing = repo.couponsOfTrial(tx, id);

      // Recover the codes already printed on existing tags so that new tags agree with them.
      const resinOfCondition = new Map(conditions.map((c) => [c.id, c.resinId]));
      const spTaken = new Map<number, string>();
      const rsTaken = new Map<number, string>();
      for (const c of existing) {
        const parsed = parseTag(trial.code, c.tag);
        if (!parsed) continue;
        if (!spTaken.has(c.speciesId)) spTaken.set(c.speciesId, parsed.species);
        const resinId = c.conditionId === null ? undefined : resinOfCondition.get(c.conditionId);
        if (parsed.role === 'treated' && resinId !== undefined && !rsTaken.has(resinId)) rsTaken.set(resinId, parsed.resin);
      }
      const spCodes = assignCodes(
        [...new Map(conditions.map((c) => [c.speciesId, c.speciesName])).entries()].map(([sid, name]) => ({ id: sid, name })),
        spTaken,
        speciesCode,
      );
      const rsCodes = assignCodes(
        [...new Map(conditions.map((c) => [c.resinId, c.resinName])).entries()].map(([rid, name]) => ({ id: rid, name })),
        rsTaken,
        resinCode,
      );

      const taken = repo.tagsWithPrefix(tx, `${trial.code}-`);
      const nextFree = new Map<string, number>();
      const nextTag = (prefixKey: string, make: (n: number) => string) => {
        let n = nextFree.get(prefixKey) ?? 1;
        while (taken.has(make(n))) n++;
        const tag = make(n);
        nextFree.set(prefixKey, n + 1);
        taken.add(tag);
        return tag;
      };

      const made: repo.CouponRow[] = [];
      for (const c of conditions) {
        const have = existing.filter((x) => x.conditionId === c.id).length;
        const sp = spCodes.get(c.speciesId)!;
        const rs = rsCodes.get(c.resinId)!;
        for (let i = have; i < c.couponsWanted; i++) {
          const tag = nextTag(`${sp}-${rs}`, (n) => treatedTag(trial.code, sp, rs, n));
          made.push(repo.insertCoupon(tx, { tag, trialId: id, conditionId: c.id, speciesId: c.speciesId, role: 'treated', createdBy: actor.id }));
        }
      }
      for (const [speciesId, sp] of spCodes) {
        const have = existing.filter((x) => x.role === 'control' && x.conditionId === null && x.speciesId === speciesId).length;
        for (let i = have; i < trial.controlsPerSpecies; i++) {
          const tag = nextTag(`${sp}-C`, (n) => controlTag(trial.code, sp, n));
          made.push(repo.insertCoupon(tx, { tag, trialId: id, conditionId: null, speciesId, role: 'control', createdBy: actor.id }));
        }
      }
      if (made.length) {
        refreshResults(
          tx,
          made.map((m) => m.id),
        );
        writeAudit(tx, {
          actorId: actor.id,
          action: 'create-coupons',
          entity: 'trial',
          entityId: id,
          after: { created: made.length, tags: made.map((m) => m.tag) },
        });
      }
      const all = repo.couponsOfTrial(tx, id);
      return {
        created: made.length,
        coupons: all.map((c) => ({ id: c.id, tag: c.tag, role: c.role, speciesId: c.speciesId, conditionId: c.conditionId })),
        trial: getTrial(id, tx),
      };
    });
  }

  async function labels(id: number): Promise<LabelSheet> {
    const trial = repo.findTrial(db, id);
    if (!trial) throw new NotFound('Trial');
    const rows = repo.labelRows(db, id);
    const address = labelAddress(readShopSettings(db).labelBaseUrl, deps.appUrl);
    const base = address.url;
    // Loaded with the first labels printed, not at start (bench/server-memory.ts).
    const { default: QRCode } = await import('qrcode');
    const out = [];
    for (const r of rows) {
      const url = `${base}/coupons/${r.id}`;
      // Medium error correction survives a smudged or partly scuffed label at the bench.
      const qrSvg = await QRCode.toString(url, { type: 'svg', errorCorrectionLevel: 'M', margin: 1 });
      out.push({
        couponId: r.id,
        tag: r.tag,
        speciesName: r.speciesName,
        role: r.role,
        conditionLabel:
          r.role === 'control' || r.resinName === null || r.processLabel === null
            ? `${r.speciesName} · untreated control`
            : conditionLabel(r.speciesName, r.resinName, r.processLabel),
        url,
        qrSvg,
      });
    }
    return { trial: { id: trial.id, code: trial.code, title: trial.title }, address, labels: out };
  }

  return {
    listTrials,
    exportRows,
    getTrial: (id: number, units?: UnitChoice) => getTrial(id, db, units),
    createTrial,
    updateTrial,
    createPlannedCoupons,
    labels,
  };
}
export type TrialsService = ReturnType<typeof createTrialsService>;
