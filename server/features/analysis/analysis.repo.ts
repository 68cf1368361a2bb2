import { and, asc, desc, eq, gte, inArray, isNotNull, lte, ne, or, sql, type SQL } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { evidence } from '../../db/schema/analysis';
import { users } from '../../db/schema/auth';
import { coupons } from '../../db/schema/coupons';
import { resins, species } from '../../db/schema/reference';
import { couponResults } from '../../db/schema/results';
import { runs } from '../../db/schema/runs';
import type { HardnessScale } from '../../../shared/constants/records';
import { antiSwell } from '../../../shared/coupons/metrics';
import { referenceOvenDrySg } from '../../../shared/coupons/plausibility';
import type { AnalysisCoupon, AnalysisFilters } from '../../../shared/schemas/analysis';

const cr = couponResults;

/** The filters as SQL on the results table (and the coupon's entry date). */
export function filterConditions(f: AnalysisFilters): SQL[] {
  const w: SQL[] = [];
  if (f.trialId) w.push(inArray(cr.trialId, f.trialId));
  if (f.conditionId) w.push(inArray(cr.conditionId, f.conditionId));
  if (f.speciesId) w.push(inArray(cr.speciesId, f.speciesId));
  if (f.speciesOrigin) w.push(eq(species.origin, f.speciesOrigin));
  if (f.resinId) w.push(inArray(cr.resinId, f.resinId));
  if (f.lotId) w.push(inArray(cr.resinLotId, f.lotId));
  if (f.runId) w.push(inArray(cr.runId, f.runId));
  if (f.role) w.push(eq(cr.role, f.role));
  if (f.sourceBoard) w.push(eq(cr.sourceBoard, f.sourceBoard));
  if (f.thicknessMinMm !== undefined) w.push(gte(cr.thicknessMm, f.thicknessMinMm));
  if (f.thicknessMaxMm !== undefined) w.push(lte(cr.thicknessMm, f.thicknessMaxMm));
  if (f.from) w.push(gte(sql`substr(${coupons.createdAt}, 1, 10)`, f.from));
  if (f.to) w.push(lte(sql`substr(${coupons.createdAt}, 1, 10)`, f.to));
  return w;
}

interface SpeciesInfo {
  name: string;
  origin: AnalysisCoupon['speciesOrigin'];
  referenceSg: number | null;
  cov: number | null;
}

/** Species names and reference oven-dry SG, once per request (a small reference table). */
function speciesInfo(db: Db): Map<number, SpeciesInfo> {
  const out = new Map<number, SpeciesInfo>();
  for (const s of db.select().from(species).all()) {
    out.set(s.id, { name: s.commonName, origin: s.origin, referenceSg: referenceOvenDrySg(s), cov: s.sgCoefficientOfVariation });
  }
  return out;
}


const selection = {
  id: cr.couponId,
  tag: cr.tag,
  trialId: cr.trialId,
  conditionId: cr.conditionId,
  runId: cr.runId,
  runCode: runs.code,
  speciesId: cr.speciesId,
  resinId: cr.resinId,
  resinName: resins.name,
  resinDensityGcm3: resins.curedDensityGcm3,
  lotId: cr.resinLotId,
  role: cr.role,
  sourceBoard: cr.sourceBoard,
  thicknessMm: cr.thicknessMm,
  dryMassG: cr.dryMassG,
  curedMassG: cr.curedMassG,
  drySg: cr.drySg,
  wpgPct: cr.wpgPct,
  resinLoadingKgM3: cr.resinLoadingKgM3,
  voidFillPct: cr.voidFillPct,
  maxWpgPct: cr.maxWpgPct,
  swellingPct: cr.swellingPct,
  swellingBasis: cr.swellingBasis,
  hDryShore: cr.hardnessDryShoreD,
  hDryJanka: cr.hardnessDryJankaN,
  hDryBrinell: cr.hardnessDryBrinellHb,
  hCuredShore: cr.hardnessCuredShoreD,
  hCuredJanka: cr.hardnessCuredJankaN,
  hCuredBrinell: cr.hardnessCuredBrinellHb,
  problemCount: cr.problemCount,
  problems: cr.problems,
  createdAt: coupons.createdAt,
};
type Selected = {
  [K in keyof typeof selection]: (typeof selection)[K]['_']['notNull'] extends true ? (typeof selection)[K]['_']['data'] : (typeof selection)[K]['_']['data'] | null;
};

function hardnessOf(r: Selected): { value: number; scale: HardnessScale } | null {
  // Treated coupons are judged after the cure; controls are untreated, so their dry-stage reading counts.
  const cured: [HardnessScale, number | null][] = [
    ['shore-d', r.hCuredShore],
    ['janka-n', r.hCuredJanka],
    ['brinell-hb', r.hCuredBrinell],
  ];
  const dry: [HardnessScale, number | null][] = [
    ['shore-d', r.hDryShore],
    ['janka-n', r.hDryJanka],
    ['brinell-hb', r.hDryBrinell],
  ];
  const order = r.role === 'treated' ? cured : [...dry, ...cured];
  for (const [scale, value] of order) if (value !== null) return { value, scale };
  return null;
}

function baseQuery(db: Db) {
  return db
    .select(selection)
    .from(cr)
    .innerJoin(coupons, eq(coupons.id, cr.couponId))
    .innerJoin(species, eq(species.id, cr.speciesId))
    .leftJoin(resins, eq(resins.id, cr.resinId))
    .leftJoin(runs, eq(runs.id, cr.runId));
}

/**
 * The results rows matching the filters, as the analysis sees them, in coupon id order. ASE is taken
 * against the controls of the same trial and species whatever the filters (a role filter must not
 * remove the controls a treated coupon is judged against).
 */
export function loadAnalysisCoupons(db: Db, f: AnalysisFilters, extra: SQL[] = []): AnalysisCoupon[] {
  const where = [...filterConditions(f), ...extra];
  const rows = baseQuery(db)
    .where(where.length ? and(...where) : undefined)
    .orderBy(asc(cr.couponId))
    .all() as Selected[];
  return toAnalysisCoupons(db, rows);
}

function toAnalysisCoupons(db: Db, rows: Selected[]): AnalysisCoupon[] {
  const sp = speciesInfo(db);
  const trialIds = new Set<number>();
  for (const r of rows) if (r.role === 'treated' && r.trialId !== null && r.swellingPct !== null) trialIds.add(r.trialId);
  const controls = new Map<string, { swellingPct: number | null; swellingBasis: 'volume' | 'mass' | null }[]>();
  if (trialIds.size > 0) {
    const ctl = db
      .select({ trialId: cr.trialId, speciesId: cr.speciesId, swellingPct: cr.swellingPct, swellingBasis: cr.swellingBasis })
      .from(cr)
      .where(and(eq(cr.role, 'control'), isNotNull(cr.swellingPct), inArray(cr.trialId, [...trialIds])))
      .all();
    for (const c of ctl) {
      const k = `${c.trialId}|${c.speciesId}`;
      const list = controls.get(k) ?? [];
      list.push(c);
      controls.set(k, list);
    }
  }
  return rows.map((r) => {
    const s = sp.get(r.speciesId);
    const h = hardnessOf(r);
    const blankReasons: Record<string, string> = {};
    if (r.problemCount > 0) for (const p of r.problems) blankReasons[p.metric] ??= p.message;
    let asePct: number | null = null;
    if (r.role === 'treated' && r.trialId !== null && r.swellingPct !== null) {
      const a = antiSwell({ swellingPct: r.swellingPct, swellingBasis: r.swellingBasis }, controls.get(`${r.trialId}|${r.speciesId}`) ?? []);
      asePct = a?.asePct ?? null;
    }
    return {
      id: r.id,
      tag: r.tag,
      trialId: r.trialId,
      conditionId: r.conditionId,
      runId: r.runId,
      runCode: r.runCode,
      speciesId: r.speciesId,
      speciesName: s?.name ?? `species ${r.speciesId}`,
      speciesOrigin: s?.origin ?? 'handbook',
      resinId: r.resinId,
      resinName: r.resinName,
      resinDensityGcm3: r.resinDensityGcm3,
      lotId: r.lotId,
      role: r.role,
      sourceBoard: r.sourceBoard,
      thicknessMm: r.thicknessMm,
      dryMassG: r.dryMassG,
      curedMassG: r.curedMassG,
      drySg: r.drySg,
      referenceSg: s?.referenceSg ?? null,
      referenceSgCov: s?.cov ?? null,
      wpgPct: r.wpgPct,
      resinLoadingKgM3: r.resinLoadingKgM3,
      voidFillPct: r.voidFillPct,
      maxWpgPct: r.maxWpgPct,
      swellingPct: r.swellingPct,
      asePct,
      hardnessValue: h?.value ?? null,
      hardnessScale: h?.scale ?? null,
      createdAt: r.createdAt,
      blankReasons,
    };
  });
}

/** Treated coupons of the given species × resin pairs from runs other than `runId` (the shop's history). */
export function loadHistory(db: Db, pairs: { speciesId: number; resinId: number }[], runId: number): AnalysisCoupon[] {
  if (pairs.length === 0) return [];
  const rows = baseQuery(db)
    .where(
      and(
        eq(cr.role, 'treated'),
        or(ne(cr.runId, runId), sql`${cr.runId} is null`),
        or(...pairs.map((p) => and(eq(cr.speciesId, p.speciesId), eq(cr.resinId, p.resinId)))),
      ),
    )
    .orderBy(asc(cr.couponId))
    .all() as Selected[];
  return toAnalysisCoupons(db, rows);
}

export function runExists(db: Db, id: number): boolean {
  return db.select({ id: runs.id }).from(runs).where(eq(runs.id, id)).get() !== undefined;
}

/** WPG values of treated coupons of one species × resin, for the spread a sample size is planned from. */
export function wpgValues(db: Db, speciesId: number | undefined, resinId: number | undefined): number[] {
  const w: SQL[] = [eq(cr.role, 'treated'), isNotNull(cr.wpgPct)];
  if (speciesId !== undefined) w.push(eq(cr.speciesId, speciesId));
  if (resinId !== undefined) w.push(eq(cr.resinId, resinId));
  return db
    .select({ v: cr.wpgPct })
    .from(cr)
    .where(and(...w))
    .all()
    .map((r) => r.v as number);
}

export type EvidenceRow = typeof evidence.$inferSelect;

export function insertEvidence(db: Db, values: typeof evidence.$inferInsert): EvidenceRow {
  return db.insert(evidence).values(values).returning().get();
}

export function findEvidence(db: Db, id: number) {
  return db
    .select({ e: evidence, authorName: users.name })
    .from(evidence)
    .leftJoin(users, eq(users.id, evidence.createdBy))
    .where(eq(evidence.id, id))
    .get();
}

export function listEvidence(db: Db, page: number, pageSize: number) {
  const items = db
    .select({ id: evidence.id, title: evidence.title, createdAt: evidence.createdAt, fingerprint: evidence.fingerprint })
    .from(evidence)
    .orderBy(desc(evidence.id))
    .limit(pageSize)
    .offset((page - 1) * pageSize)
    .all();
  const total = db.select({ n: sql<number>`count(*)` }).from(evidence).get()?.n ?? 0;
  return { items, total };
}
