import { and, desc, eq, inArray, isNotNull, sql, type SQL } from 'drizzle-orm';
import type Database from 'better-sqlite3';
import type { Db } from '../../db/client';
import { evidence } from '../../db/schema/analysis';
import { users } from '../../db/schema/auth';
import { species } from '../../db/schema/reference';
import { couponResults } from '../../db/schema/results';
import { runs } from '../../db/schema/runs';
import type { HardnessScale } from '../../../shared/constants/records';
import { antiSwell } from '../../../shared/coupons/metrics';
import { referenceOvenDrySg } from '../../../shared/coupons/plausibility';
import type { AnalysisCoupon, AnalysisFilters } from '../../../shared/schemas/analysis';

const cr = couponResults;

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

interface Selected {
  id: number;
  tag: string;
  trialId: number | null;
  conditionId: number | null;
  runId: number | null;
  runCode: string | null;
  speciesId: number;
  resinId: number | null;
  resinName: string | null;
  resinDensityGcm3: number | null;
  lotId: number | null;
  role: 'treated' | 'control';
  sourceBoard: string | null;
  thicknessMm: number | null;
  dryMassG: number | null;
  curedMassG: number | null;
  drySg: number | null;
  wpgPct: number | null;
  resinLoadingKgM3: number | null;
  voidFillPct: number | null;
  maxWpgPct: number | null;
  swellingPct: number | null;
  swellingBasis: 'volume' | 'mass' | null;
  hDryShore: number | null;
  hDryJanka: number | null;
  hDryBrinell: number | null;
  hCuredShore: number | null;
  hCuredJanka: number | null;
  hCuredBrinell: number | null;
  problemCount: number;
  problems: { metric: string; message: string }[];
  createdAt: string;
}

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

/** Columns read per coupon, in this order (one statement, rows as arrays: no per-row mapping layer). */
const COLUMNS = `cr.coupon_id, cr.tag, cr.trial_id, cr.condition_id, cr.run_id, r.code, cr.species_id, cr.resin_id, rs.name, rs.cured_density_g_cm3,
  cr.resin_lot_id, cr.role, cr.source_board, cr.thickness_mm, cr.dry_mass_g, cr.cured_mass_g, cr.dry_sg, cr.wpg_pct, cr.resin_loading_kg_m3,
  cr.void_fill_pct, cr.max_wpg_pct, cr.swelling_pct, cr.swelling_basis, cr.hardness_dry_shore_d, cr.hardness_dry_janka_n, cr.hardness_dry_brinell_hb,
  cr.hardness_cured_shore_d, cr.hardness_cured_janka_n, cr.hardness_cured_brinell_hb, cr.problem_count, cr.problems, c.created_at`;

/** The filters as a parameterised WHERE clause on the same columns the Drizzle conditions use. */
function rawWhere(f: AnalysisFilters): { clause: string; params: (string | number)[] } {
  const w: string[] = [];
  const params: (string | number)[] = [];
  const list = (col: string, ids: number[] | undefined) => {
    if (!ids) return;
    w.push(`${col} in (${ids.map(() => '?').join(',')})`);
    params.push(...ids);
  };
  list('cr.trial_id', f.trialId);
  list('cr.condition_id', f.conditionId);
  list('cr.species_id', f.speciesId);
  list('cr.resin_id', f.resinId);
  list('cr.resin_lot_id', f.lotId);
  list('cr.run_id', f.runId);
  const one = (cond: string, v: string | number | undefined) => {
    if (v === undefined) return;
    w.push(cond);
    params.push(v);
  };
  one('sp.origin = ?', f.speciesOrigin);
  one('cr.role = ?', f.role);
  one('cr.source_board = ?', f.sourceBoard);
  one('cr.thickness_mm >= ?', f.thicknessMinMm);
  one('cr.thickness_mm <= ?', f.thicknessMaxMm);
  one('substr(c.created_at, 1, 10) >= ?', f.from);
  one('substr(c.created_at, 1, 10) <= ?', f.to);
  return { clause: w.length ? `where ${w.join(' and ')}` : '', params };
}

type RawRow = [
  number,
  string,
  number | null,
  number | null,
  number | null,
  string | null,
  number,
  number | null,
  string | null,
  number | null,
  number | null,
  'treated' | 'control',
  string | null,
  number | null,
  number | null,
  number | null,
  number | null,
  number | null,
  number | null,
  number | null,
  number | null,
  number | null,
  'volume' | 'mass' | null,
  number | null,
  number | null,
  number | null,
  number | null,
  number | null,
  number | null,
  number,
  string,
  string,
];

/**
 * The results rows matching the filters, as the analysis sees them, in coupon id order: one prepared
 * statement over coupon_results (joined to the coupon for its entry date and to the run, resin and
 * species for names). ASE is taken against the controls of the same trial and species whatever the
 * filters (a role filter must not remove the controls a treated coupon is judged against).
 */
export function loadAnalysisCoupons(db: Db, f: AnalysisFilters): AnalysisCoupon[] {
  const { clause: where, params } = rawWhere(f);
  // The Drizzle handle made by openDatabase carries its better-sqlite3 connection; raw rows skip the mapping layer.
  const raw = (db as Db & { $client: Database.Database }).$client
    .prepare(
      `select ${COLUMNS} from coupon_results cr join coupons c on c.id = cr.coupon_id join species sp on sp.id = cr.species_id
       left join resins rs on rs.id = cr.resin_id left join runs r on r.id = cr.run_id ${where} order by cr.coupon_id`,
    )
    .raw(true)
    .all(...params) as RawRow[];
  const rows: Selected[] = raw.map((x) => ({
    id: x[0],
    tag: x[1],
    trialId: x[2],
    conditionId: x[3],
    runId: x[4],
    runCode: x[5],
    speciesId: x[6],
    resinId: x[7],
    resinName: x[8],
    resinDensityGcm3: x[9],
    lotId: x[10],
    role: x[11],
    sourceBoard: x[12],
    thicknessMm: x[13],
    dryMassG: x[14],
    curedMassG: x[15],
    drySg: x[16],
    wpgPct: x[17],
    resinLoadingKgM3: x[18],
    voidFillPct: x[19],
    maxWpgPct: x[20],
    swellingPct: x[21],
    swellingBasis: x[22],
    hDryShore: x[23],
    hDryJanka: x[24],
    hDryBrinell: x[25],
    hCuredShore: x[26],
    hCuredJanka: x[27],
    hCuredBrinell: x[28],
    problemCount: x[29],
    // The blank reasons are read only where there are some.
    problems: x[29] > 0 ? (JSON.parse(x[30]) as Selected['problems']) : [],
    createdAt: x[31],
  }));
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
  const wanted = new Set(pairs.map((p) => `${p.speciesId}|${p.resinId}`));
  return loadAnalysisCoupons(db, {
    speciesId: [...new Set(pairs.map((p) => p.speciesId))],
    resinId: [...new Set(pairs.map((p) => p.resinId))],
    role: 'treated',
  }).filter((c) => c.runId !== runId && wanted.has(`${c.speciesId}|${c.resinId}`));
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
  return db.select({ e: evidence, authorName: users.name }).from(evidence).leftJoin(users, eq(users.id, evidence.createdBy)).where(eq(evidence.id, id)).get();
}

export function listEvidence(db: Db, page: number, pageSize: number) {
  const items = db
    .select({ id: evidence.id, title: evidence.title, createdAt: evidence.createdAt, fingerprint: evidence.fingerprint })
    .from(evidence)
    .orderBy(desc(evidence.id))
    .limit(pageSize)
    .offset((page - 1) * pageSize)
    .all();
  const total =
    db
      .select({ n: sql<number>`count(*)` })
      .from(evidence)
      .get()?.n ?? 0;
  return { items, total };
}
