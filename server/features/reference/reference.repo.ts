import { and, asc, count, desc, eq, inArray, or, sql, type SQL } from 'drizzle-orm';
import type { SQLiteColumn } from 'drizzle-orm/sqlite-core';
import type { Db } from '../../db/client';
import { coupons } from '../../db/schema/coupons';
import { resinLots, resins, species } from '../../db/schema/reference';
import { runs } from '../../db/schema/runs';
import { readShopSettings } from '../../db/shop-settings';
import type { ResinListQuery, ResinLotListQuery, SpeciesListQuery } from '../../../shared/schemas/reference';
import type { Option, OptionsQuery } from '../../../shared/schemas/options';

export type SpeciesRow = typeof species.$inferSelect;
export type ResinRow = typeof resins.$inferSelect;
export type ResinLotRow = typeof resinLots.$inferSelect;

/** `%` and `_` typed by a user are literal characters, not wildcards. */
export function likePattern(q: string): string {
  return `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}
const likeEscaped = (col: SQLiteColumn, q: string) => sql`${col} like ${likePattern(q)} escape '\\'`;

function orderOf(sort: string | undefined, columns: Record<string, SQLiteColumn>, fallback: SQL[]): SQL[] {
  if (!sort) return fallback;
  const descending = sort.startsWith('-');
  const col = columns[sort.replace(/^-/, '')];
  if (!col) return fallback;
  return [descending ? desc(col) : asc(col), ...fallback];
}

/** The shop's lot shelf life, from settings over the default (the same merge the settings screen uses). */
export function shopLotShelfLifeDays(db: Db): number {
  return readShopSettings(db).lotShelfLifeDays;
}

// ------------------------------------------------------------ species

export function listSpecies(db: Db, q: SpeciesListQuery) {
  const where = and(
    q.q ? or(likeEscaped(species.commonName, q.q), likeEscaped(species.botanicalName, q.q)) : undefined,
    q.origin ? eq(species.origin, q.origin) : undefined,
  );
  const rows = db
    .select()
    .from(species)
    .where(where)
    .orderBy(
      ...orderOf(
        q.sort,
        {
          commonName: species.commonName,
          botanicalName: species.botanicalName,
          basicSg: species.basicSg,
          sg12: species.sg12,
          sideHardnessN: species.sideHardnessN,
          createdAt: species.createdAt,
        },
        [asc(species.commonName), asc(species.id)],
      ),
    )
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .all();
  const total = db.select({ n: count() }).from(species).where(where).get()?.n ?? 0;
  return { rows, total };
}

export function findSpecies(db: Db, id: number): SpeciesRow | undefined {
  return db.select().from(species).where(eq(species.id, id)).get();
}
export function findSpeciesByName(db: Db, commonName: string): SpeciesRow | undefined {
  return db
    .select()
    .from(species)
    .where(sql`${species.commonName} = ${commonName} collate nocase`)
    .get();
}
export function countSpecies(db: Db): number {
  return db.select({ n: count() }).from(species).get()?.n ?? 0;
}
export function insertSpecies(db: Db, values: typeof species.$inferInsert): SpeciesRow {
  return db.insert(species).values(values).returning().get();
}
export function updateSpeciesRow(db: Db, id: number, values: Partial<typeof species.$inferInsert>): SpeciesRow {
  return db.update(species).set(values).where(eq(species.id, id)).returning().get();
}

// ------------------------------------------------------------ resins

export function listResins(db: Db, q: ResinListQuery) {
  const where = q.q ? or(likeEscaped(resins.name, q.q), likeEscaped(resins.kind, q.q)) : undefined;
  const rows = db
    .select()
    .from(resins)
    .where(where)
    .orderBy(...orderOf(q.sort, { name: resins.name, kind: resins.kind, createdAt: resins.createdAt }, [asc(resins.name), asc(resins.id)]))
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .all();
  const total = db.select({ n: count() }).from(resins).where(where).get()?.n ?? 0;
  return { rows, total };
}
export function findResin(db: Db, id: number): ResinRow | undefined {
  return db.select().from(resins).where(eq(resins.id, id)).get();
}
export function findResinByName(db: Db, name: string): ResinRow | undefined {
  return db
    .select()
    .from(resins)
    .where(sql`${resins.name} = ${name} collate nocase`)
    .get();
}
export function insertResin(db: Db, values: typeof resins.$inferInsert): ResinRow {
  return db.insert(resins).values(values).returning().get();
}
export function updateResinRow(db: Db, id: number, values: Partial<typeof resins.$inferInsert>): ResinRow {
  return db.update(resins).set(values).where(eq(resins.id, id)).returning().get();
}
/** Active lots of the given resins, for counting the usable ones. */
export function activeLotsOf(db: Db, resinIds: number[]): Pick<ResinLotRow, 'resinId' | 'activatedAt'>[] {
  if (resinIds.length === 0) return [];
  return db
    .select({ resinId: resinLots.resinId, activatedAt: resinLots.activatedAt })
    .from(resinLots)
    .where(and(inArray(resinLots.resinId, resinIds), eq(resinLots.status, 'active')))
    .all();
}

// ------------------------------------------------------------ resin lots

const lotWithResin = {
  lot: resinLots,
  resinName: resins.name,
  shelfLifeDays: resins.shelfLifeDays,
};
export type LotWithResin = { lot: ResinLotRow; resinName: string; shelfLifeDays: number };

export function listLots(db: Db, q: ResinLotListQuery) {
  const where = and(q.resinId ? eq(resinLots.resinId, q.resinId) : undefined, q.status ? eq(resinLots.status, q.status) : undefined);
  const rows = db
    .select(lotWithResin)
    .from(resinLots)
    .innerJoin(resins, eq(resins.id, resinLots.resinId))
    .where(where)
    .orderBy(
      ...orderOf(q.sort, { activatedAt: resinLots.activatedAt, code: resinLots.code, createdAt: resinLots.createdAt }, [
        desc(resinLots.activatedAt),
        desc(resinLots.id),
      ]),
    )
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .all();
  const total = db.select({ n: count() }).from(resinLots).where(where).get()?.n ?? 0;
  return { rows, total };
}
export function findLot(db: Db, id: number): LotWithResin | undefined {
  return db.select(lotWithResin).from(resinLots).innerJoin(resins, eq(resins.id, resinLots.resinId)).where(eq(resinLots.id, id)).get();
}
export function findLotByCode(db: Db, code: string): ResinLotRow | undefined {
  return db
    .select()
    .from(resinLots)
    .where(sql`${resinLots.code} = ${code} collate nocase`)
    .get();
}
export function insertLot(db: Db, values: typeof resinLots.$inferInsert): ResinLotRow {
  return db.insert(resinLots).values(values).returning().get();
}
export function updateLotRow(db: Db, id: number, values: Partial<typeof resinLots.$inferInsert>): ResinLotRow {
  return db.update(resinLots).set(values).where(eq(resinLots.id, id)).returning().get();
}

/** Distinct species names of the coupons in runs that used each lot (coupons.run_id → runs.resin_lot_id). */
export function speciesThroughLots(db: Db, lotIds: number[]): Map<number, string[]> {
  const out = new Map<number, string[]>();
  if (lotIds.length === 0) return out;
  const rows = db
    .selectDistinct({ lotId: runs.resinLotId, name: species.commonName })
    .from(coupons)
    .innerJoin(runs, eq(runs.id, coupons.runId))
    .innerJoin(species, eq(species.id, coupons.speciesId))
    .where(inArray(runs.resinLotId, lotIds))
    .orderBy(asc(species.commonName))
    .all();
  for (const r of rows) {
    if (r.lotId === null) continue;
    const list = out.get(r.lotId) ?? [];
    list.push(r.name);
    out.set(r.lotId, list);
  }
  return out;
}

// Pickers' light lists: id, code and a label (optionsResponseSchema).
export function speciesOptions(db: Db, q: OptionsQuery): Option[] {
  return db
    .select({ id: species.id, code: species.botanicalName, label: species.commonName })
    .from(species)
    .where(q.q ? or(likeEscaped(species.commonName, q.q), likeEscaped(species.botanicalName, q.q)) : undefined)
    .orderBy(asc(species.commonName), asc(species.id))
    .limit(q.limit)
    .all();
}
export function resinOptions(db: Db, q: OptionsQuery): Option[] {
  return db
    .select({ id: resins.id, code: resins.name, label: resins.name })
    .from(resins)
    .where(q.q ? likeEscaped(resins.name, q.q) : undefined)
    .orderBy(asc(resins.name), asc(resins.id))
    .limit(q.limit)
    .all();
}
/** Lots newest activation first, labelled with their resin and status. */
export function lotOptions(db: Db, q: OptionsQuery): Option[] {
  return db
    .select({ id: resinLots.id, code: resinLots.code, resin: resins.name, status: resinLots.status })
    .from(resinLots)
    .innerJoin(resins, eq(resinLots.resinId, resins.id))
    .where(q.q ? or(likeEscaped(resinLots.code, q.q), likeEscaped(resins.name, q.q)) : undefined)
    .orderBy(desc(resinLots.activatedAt), desc(resinLots.id))
    .limit(q.limit)
    .all()
    .map((l) => ({ id: l.id, code: l.code, label: `${l.code} · ${l.resin}${l.status === 'active' ? '' : ` (${l.status})`}` }));
}
