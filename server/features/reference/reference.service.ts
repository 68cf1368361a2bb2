import type { FeatureDeps } from '../../deps';
import type { Db } from '../../db/client';
import { writeAudit } from '../../db/audit';
import { couponIdsOfResin, refreshResultsAround } from '../../measurements/results';
import { Conflict, NotFound, Unprocessable, ValidationFailed } from '../../http/errors';
import {
  lotShelfLife,
  resinRowProblems,
  speciesRowProblems,
  type CreateResinInput,
  DEFAULT_CURE_WINDOW_C,
  type CreateResinLotInput,
  type CreateSpeciesInput,
  type Resin,
  type ResinListQuery,
  type ResinLot,
  type ResinLotListQuery,
  type Species,
  type SpeciesListQuery,
  type UpdateResinInput,
  type UpdateResinLotInput,
  type UpdateSpeciesInput,
} from '../../../shared/schemas/reference';
import type { User } from '../../../shared/schemas/auth';
import * as repo from './reference.repo';

type List<T> = { items: T[]; page: number; pageSize: number; total: number };

function toSpecies(r: repo.SpeciesRow): Species {
  return {
    id: r.id,
    commonName: r.commonName,
    botanicalName: r.botanicalName,
    basicSg: r.basicSg,
    sg12: r.sg12,
    sideHardnessN: r.sideHardnessN,
    measuredDensityKgM3: r.measuredDensityKgM3,
    measuredMoisturePct: r.measuredMoisturePct,
    sgCoefficientOfVariation: r.sgCoefficientOfVariation,
    source: r.source,
    origin: r.origin,
    notes: r.notes,
    createdAt: r.createdAt,
  };
}

/** A date-only activation is kept as the date; a timestamp is normalized to UTC ISO. */
function normalizeActivatedAt(value: string): string {
  return /^\d{4}-\d{2}-\d{2}$/.test(value) ? value : new Date(value).toISOString();
}

/** Only the fields that changed, before and after, so the audit row reads as a diff. */
function diff<T extends Record<string, unknown>>(before: T, after: T): { before: Partial<T>; after: Partial<T> } | null {
  const b: Partial<T> = {};
  const a: Partial<T> = {};
  for (const key of Object.keys(after) as (keyof T)[]) {
    if (before[key] !== after[key]) {
      b[key] = before[key];
      a[key] = after[key];
    }
  }
  return Object.keys(a).length ? { before: b, after: a } : null;
}

export function createReferenceService(deps: Pick<FeatureDeps, 'database' | 'now'>) {
  const { db } = deps.database;

  function lotOut(row: repo.LotWithResin, through: string[]): ResinLot {
    const { lot } = row;
    return {
      id: lot.id,
      resinId: lot.resinId,
      resinName: row.resinName,
      code: lot.code,
      activatedAt: lot.activatedAt,
      catalystNotes: lot.catalystNotes,
      dyeNotes: lot.dyeNotes,
      volumeMl: lot.volumeMl,
      reuseCount: lot.reuseCount,
      status: lot.status,
      notes: lot.notes,
      createdAt: lot.createdAt,
      ...lotShelfLife(lot.activatedAt, row.shelfLifeDays, deps.now()),
      speciesThroughLot: through,
    };
  }

  function resinsOut(rows: repo.ResinRow[]): Resin[] {
    const lots = repo.activeLotsOf(
      db,
      rows.map((r) => r.id),
    );
    const now = deps.now();
    return rows.map((r) => ({
      id: r.id,
      name: r.name,
      kind: r.kind,
      liquidDensityGcm3: r.liquidDensityGcm3,
      curedDensityGcm3: r.curedDensityGcm3,
      cureMinC: r.cureMinC,
      cureMaxC: r.cureMaxC,
      shelfLifeDays: r.shelfLifeDays,
      notes: r.notes,
      createdAt: r.createdAt,
      usableLots: lots.filter((l) => l.resinId === r.id && !lotShelfLife(l.activatedAt, r.shelfLifeDays, now).expired).length,
    }));
  }

  function checkActivation(activatedAt: string) {
    // A day of slack so a lot activated this evening in a time zone ahead of UTC is not refused.
    if (Date.parse(activatedAt) > deps.now().getTime() + 24 * 3600 * 1000) {
      throw new Unprocessable('The activation date is in the future', { activatedAt: ['The activation date is in the future'] });
    }
  }

  return {
    // ---------------------------------------------------------------- species
    listSpecies(q: SpeciesListQuery): List<Species> {
      const { rows, total } = repo.listSpecies(db, q);
      return { items: rows.map(toSpecies), page: q.page, pageSize: q.pageSize, total };
    },

    getSpecies(id: number): Species {
      const row = repo.findSpecies(db, id);
      if (!row) throw new NotFound('Species');
      return toSpecies(row);
    },

    createSpecies(actor: User, input: CreateSpeciesInput): Species {
      return db.transaction((tx) => {
        if (repo.findSpeciesByName(tx, input.commonName)) {
          throw new Conflict('A species of that name already exists', { commonName: ['A species of that name already exists'] });
        }
        const row = repo.insertSpecies(tx, { ...input, createdBy: actor.id });
        writeAudit(tx, { actorId: actor.id, action: 'create', entity: 'species', entityId: row.id, after: row });
        return toSpecies(row);
      });
    },

    updateSpecies(actor: User, id: number, input: UpdateSpeciesInput): Species {
      return db.transaction((tx) => {
        const before = repo.findSpecies(tx, id);
        if (!before) throw new NotFound('Species');
        const merged = { ...before, ...input };
        const problems = speciesRowProblems(merged);
        const first = Object.values(problems)[0]?.[0];
        if (first) throw new ValidationFailed(`Invalid body: ${first}`, problems);
        if (input.commonName) {
          const other = repo.findSpeciesByName(tx, input.commonName);
          if (other && other.id !== id) throw new Conflict('A species of that name already exists', { commonName: ['A species of that name already exists'] });
        }
        const after = repo.updateSpeciesRow(tx, id, input);
        const change = diff(before, after);
        if (change) writeAudit(tx, { actorId: actor.id, action: 'update', entity: 'species', entityId: id, ...change });
        return toSpecies(after);
      });
    },

    // ---------------------------------------------------------------- resins
    listResins(q: ResinListQuery): List<Resin> {
      const { rows, total } = repo.listResins(db, q);
      return { items: resinsOut(rows), page: q.page, pageSize: q.pageSize, total };
    },

    getResin(id: number): Resin {
      const row = repo.findResin(db, id);
      if (!row) throw new NotFound('Resin');
      return resinsOut([row])[0]!;
    },

    createResin(actor: User, input: CreateResinInput): Resin {
      const row = db.transaction((tx) => {
        if (repo.findResinByName(tx, input.name)) {
          throw new Conflict('A resin of that name already exists', { name: ['A resin of that name already exists'] });
        }
        const inserted = repo.insertResin(tx, {
          ...input,
          // A resin entered without its own shelf life takes the shop's rule at the time it is entered.
          shelfLifeDays: input.shelfLifeDays ?? repo.shopLotShelfLifeDays(tx),
          // 200–250 °F unrounded; the column's SQL default is the rounded 93–121 °C.
          cureMinC: input.cureMinC ?? DEFAULT_CURE_WINDOW_C.min,
          cureMaxC: input.cureMaxC ?? DEFAULT_CURE_WINDOW_C.max,
          createdBy: actor.id,
        });
        writeAudit(tx, { actorId: actor.id, action: 'create', entity: 'resin', entityId: inserted.id, after: inserted });
        return inserted;
      });
      return resinsOut([row])[0]!;
    },

    updateResin(actor: User, id: number, input: UpdateResinInput): Resin {
      const row = db.transaction((tx) => {
        const before = repo.findResin(tx, id);
        if (!before) throw new NotFound('Resin');
        const problems = resinRowProblems({ ...before, ...input });
        const first = Object.values(problems)[0]?.[0];
        if (first) throw new ValidationFailed(`Invalid body: ${first}`, problems);
        if (input.name) {
          const other = repo.findResinByName(tx, input.name);
          if (other && other.id !== id) throw new Conflict('A resin of that name already exists', { name: ['A resin of that name already exists'] });
        }
        const { reason, ...fields } = input;
        let after = before;
        // A resin's densities are inputs of its coupons' results: recompute them with the change, and
        // when measured results move, ask why and write it on every such coupon's history.
        const moved = refreshResultsAround(tx, couponIdsOfResin(tx, id), () => {
          after = repo.updateResinRow(tx, id, fields);
        });
        if (moved.length > 0 && !reason) {
          const msg = `This change moves the results of ${moved.length} measured coupon${moved.length === 1 ? '' : 's'} (void fill, maximum uptake); say why in the reason`;
          throw new ValidationFailed(msg, { reason: [msg] });
        }
        const change = diff(before, after);
        if (change) writeAudit(tx, { actorId: actor.id, action: 'update', entity: 'resin', entityId: id, ...change, reason: reason ?? null });
        // What changed (the resin's fields), why (the reason) and by whom, on each coupon whose results moved.
        for (const m of moved) {
          writeAudit(tx, {
            actorId: actor.id,
            action: 'results-recomputed',
            entity: 'coupon',
            entityId: m.couponId,
            before: { ...m.before, resin: { id, ...(change?.before ?? {}) } },
            after: { ...m.after, resin: { id, name: after.name, ...(change?.after ?? {}) } },
            reason: reason ?? null,
          });
        }
        return after;
      });
      return resinsOut([row])[0]!;
    },

    // ---------------------------------------------------------------- lots
    listLots(q: ResinLotListQuery): List<ResinLot> {
      const { rows, total } = repo.listLots(db, q);
      const through = repo.speciesThroughLots(
        db,
        rows.map((r) => r.lot.id),
      );
      return { items: rows.map((r) => lotOut(r, through.get(r.lot.id) ?? [])), page: q.page, pageSize: q.pageSize, total };
    },

    getLot(id: number): ResinLot {
      const row = repo.findLot(db, id);
      if (!row) throw new NotFound('Resin lot');
      return lotOut(row, repo.speciesThroughLots(db, [id]).get(id) ?? []);
    },

    createLot(actor: User, input: CreateResinLotInput): ResinLot {
      checkActivation(input.activatedAt);
      const id = db.transaction((tx) => {
        if (!repo.findResin(tx, input.resinId)) {
          throw new Unprocessable(`No resin with id ${input.resinId}`, { resinId: [`No resin with id ${input.resinId}`] });
        }
        if (repo.findLotByCode(tx, input.code)) throw new Conflict('A lot with that code already exists', { code: ['A lot with that code already exists'] });
        const row = repo.insertLot(tx, { ...input, activatedAt: normalizeActivatedAt(input.activatedAt), createdBy: actor.id });
        writeAudit(tx, { actorId: actor.id, action: 'create', entity: 'resin_lot', entityId: row.id, after: row });
        return row.id;
      });
      return this.getLot(id);
    },

    /**
     * Reuse count and status are what the bench changes as a lot is drained back and finally used up;
     * every change lands in the audit log with the reason given.
     */
    updateLot(actor: User, id: number, input: UpdateResinLotInput): ResinLot {
      const { reason, expectedReuseCount, ...changes } = input;
      if (changes.activatedAt !== undefined) {
        checkActivation(changes.activatedAt);
        changes.activatedAt = normalizeActivatedAt(changes.activatedAt);
      }
      db.transaction((tx) => {
        const found = repo.findLot(tx, id);
        if (!found) throw new NotFound('Resin lot');
        if (expectedReuseCount !== undefined && expectedReuseCount !== found.lot.reuseCount) {
          const msg = `Someone changed this lot meanwhile: it now shows ${found.lot.reuseCount} reuses, not ${expectedReuseCount}; look again and retry`;
          throw new Conflict(msg, { reuseCount: [msg] });
        }
        if (changes.code) {
          const other = repo.findLotByCode(tx, changes.code);
          if (other && other.id !== id) throw new Conflict('A lot with that code already exists', { code: ['A lot with that code already exists'] });
        }
        const after = repo.updateLotRow(tx, id, changes);
        const change = diff(found.lot, after);
        if (change) writeAudit(tx, { actorId: actor.id, action: 'update', entity: 'resin_lot', entityId: id, ...change, reason: reason ?? null });
      });
      return this.getLot(id);
    },
  };
}
export type ReferenceService = ReturnType<typeof createReferenceService>;

/** Writes the handbook species when the table is empty (a fresh install, demo or not). */
export function seedHandbookSpecies(
  db: Db,
  rows: readonly { commonName: string; botanicalName: string; basicSg: number; sg12: number; sideHardnessN: number | null; source: string; notes: string }[],
): void {
  if (repo.countSpecies(db) > 0) return;
  for (const r of rows) {
    repo.insertSpecies(db, {
      commonName: r.commonName,
      botanicalName: r.botanicalName,
      basicSg: r.basicSg,
      sg12: r.sg12,
      sideHardnessN: r.sideHardnessN,
      source: r.source,
      origin: 'handbook',
      notes: r.notes,
      createdBy: null,
    });
  }
}
