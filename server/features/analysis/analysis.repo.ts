import { and, desc, eq, isNotNull, sql, type SQL } from 'drizzle-orm';
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
import type { AnalysisCoupon, AnalysisFilters, GroupSpec } from '../../../shared/schemas/analysis';

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

/** The hardness scales as the load query numbers them (1, 2, 3), so no string is made per row. */
const SCALES: readonly (HardnessScale | null)[] = [null, 'shore-d', 'janka-n', 'brinell-hb'];

/**
 * The hardness a coupon is judged by, chosen in SQL: treated coupons after the cure; controls are
 * untreated, so their dry-stage reading counts first, then a cured-stage one. The first scale read wins
 * (Shore D, Janka, Brinell); scales are different tests and are never converted.
 */
const HARDNESS_VALUE = `case when cr.role = 'treated'
    then coalesce(cr.hardness_cured_shore_d, cr.hardness_cured_janka_n, cr.hardness_cured_brinell_hb)
    else coalesce(cr.hardness_dry_shore_d, cr.hardness_dry_janka_n, cr.hardness_dry_brinell_hb,
                  cr.hardness_cured_shore_d, cr.hardness_cured_janka_n, cr.hardness_cured_brinell_hb) end`;
const HARDNESS_SCALE = `case when cr.role = 'treated'
    then case when cr.hardness_cured_shore_d is not null then 1 when cr.hardness_cured_janka_n is not null then 2
              when cr.hardness_cured_brinell_hb is not null then 3 end
    else case when cr.hardness_dry_shore_d is not null then 1 when cr.hardness_dry_janka_n is not null then 2
              when cr.hardness_dry_brinell_hb is not null then 3 when cr.hardness_cured_shore_d is not null then 1
              when cr.hardness_cured_janka_n is not null then 2 when cr.hardness_cured_brinell_hb is not null then 3 end end`;

/**
 * Columns read per coupon, in this order. Each comes back as ONE JSON array over all matching rows
 * (json_group_array), so better-sqlite3 hands over a few long strings instead of a hundred thousand row
 * arrays, and JSON.parse turns them into plain arrays in native code. SQLite writes reals with 17
 * significant digits, so every double round-trips exactly. Names (species, resin, run code) are joined in
 * JavaScript from small maps, not per row in SQL.
 */
const COLUMNS = [
  'cr.coupon_id',
  'cr.tag',
  'cr.trial_id',
  'cr.condition_id',
  'cr.run_id',
  'cr.species_id',
  'cr.resin_id',
  'cr.resin_lot_id',
  "cr.role = 'control'",
  'cr.source_board',
  'cr.thickness_mm',
  'cr.dry_mass_g',
  'cr.cured_mass_g',
  'cr.dry_sg',
  'cr.wpg_pct',
  'cr.resin_loading_kg_m3',
  'cr.void_fill_pct',
  'cr.max_wpg_pct',
  'cr.swelling_pct',
  "case cr.swelling_basis when 'volume' then 1 when 'mass' then 2 end",
  HARDNESS_VALUE,
  HARDNESS_SCALE,
  // The blank reasons are read only where there are some.
  'case when cr.problem_count > 0 then cr.problems end',
] as const;

/**
 * When each run treated its coupons (YYYY-MM-DD, UTC): the day its cure began, or its soak when no cure
 * is recorded. A small map (one entry per run), read per request.
 */
function runDates(sqlite: Database.Database): Map<number, string> {
  const out = new Map<number, string>();
  const rows = prepare(
    sqlite,
    `select run_id, max(case when stage = 'cure' then started_at end), max(case when stage = 'soak' then started_at end)
     from run_stages where stage in ('cure', 'soak') group by run_id`,
  )
    .raw(true)
    .all() as [number, string | null, string | null][];
  for (const [runId, cure, soak] of rows) {
    const at = cure ?? soak;
    if (at) out.set(runId, at.slice(0, 10));
  }
  return out;
}

/** The keys of a two-group comparison's group, as SQL on the results row (each key given must match). */
function groupWhere(g: GroupSpec, params: (string | number)[]): string {
  const w: string[] = [];
  const key = (col: string, v: string | number | undefined) => {
    if (v === undefined) return;
    w.push(`${col} = ?`);
    params.push(v);
  };
  key('cr.species_id', g.speciesId);
  key('cr.resin_id', g.resinId);
  key('cr.resin_lot_id', g.lotId);
  key('cr.run_id', g.runId);
  key('cr.condition_id', g.conditionId);
  key('cr.role', g.role);
  return w.length ? `(${w.join(' and ')})` : '1';
}

/**
 * The filters as a parameterised WHERE clause; id lists are bound as one JSON array each. With `groups`,
 * only coupons in one of them are read (a comparison looks at nothing else).
 */
function rawWhere(
  f: AnalysisFilters,
  dates: Map<number, string>,
  groups?: readonly GroupSpec[],
  onlyIds?: readonly number[],
): { clause: string; params: (string | number)[] } {
  const w: string[] = [];
  const params: (string | number)[] = [];
  if (onlyIds) {
    w.push('cr.coupon_id in (select value from json_each(?))');
    params.push(JSON.stringify(onlyIds));
  }
  if (groups && groups.length > 0) w.push(`(${groups.map((g) => groupWhere(g, params)).join(' or ')})`);
  const list = (col: string, ids: number[] | undefined) => {
    if (!ids) return;
    w.push(`${col} in (select value from json_each(?))`);
    params.push(JSON.stringify(ids));
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
  one('cr.species_id in (select id from species where origin = ?)', f.speciesOrigin);
  one('cr.role = ?', f.role);
  one('cr.source_board = ?', f.sourceBoard);
  one('cr.thickness_mm >= ?', f.thicknessMinMm);
  one('cr.thickness_mm <= ?', f.thicknessMaxMm);
  if (f.from !== undefined || f.to !== undefined) {
    // The runs that treated in the range; their coupons, and the controls of the trials they served.
    const inRange: number[] = [];
    for (const [runId, day] of dates) if ((f.from === undefined || day >= f.from) && (f.to === undefined || day <= f.to)) inRange.push(runId);
    const ids = JSON.stringify(inRange);
    w.push(
      `(cr.run_id in (select value from json_each(?)) or (cr.role = 'control' and cr.trial_id in
        (select t.trial_id from coupon_results t where t.run_id in (select value from json_each(?)) and t.trial_id is not null)))`,
    );
    params.push(ids, ids);
  }
  return { clause: w.length ? `where ${w.join(' and ')}` : '', params };
}

type Col<T> = (T | null)[];
type Columns = [
  number[],
  string[],
  Col<number>,
  Col<number>,
  Col<number>,
  number[],
  Col<number>,
  Col<number>,
  number[],
  Col<string>,
  Col<number>,
  Col<number>,
  Col<number>,
  Col<number>,
  Col<number>,
  Col<number>,
  Col<number>,
  Col<number>,
  Col<number>,
  Col<number>,
  Col<number>,
  Col<number>,
  Col<string>,
];

function sqliteOf(db: Db): Database.Database {
  // The Drizzle handle made by openDatabase carries its better-sqlite3 connection.
  return (db as Db & { $client: Database.Database }).$client;
}

/** Statements by SQL text, per connection, so a repeated filter shape is prepared once. */
const prepared = new WeakMap<Database.Database, Map<string, Database.Statement>>();
function prepare(sqlite: Database.Database, sqlText: string): Database.Statement {
  let byText = prepared.get(sqlite);
  if (!byText) prepared.set(sqlite, (byText = new Map()));
  let st = byText.get(sqlText);
  if (!st) {
    st = sqlite.prepare(sqlText);
    if (byText.size > 64) byText.clear();
    byText.set(sqlText, st);
  }
  return st;
}

/**
 * The results rows matching the filters, as the analysis sees them, in coupon id order: one statement
 * over coupon_results, read column by column; with `groups`, only the coupons in one of the groups; with
 * `onlyIds`, only those coupons (to bring a held set up to date after a few writes). ASE is taken
 * against the controls of the same trial and species whatever the filters (a role filter must not remove
 * the controls a treated coupon is judged against).
 */
export function loadAnalysisCoupons(db: Db, f: AnalysisFilters, groups?: readonly GroupSpec[], onlyIds?: readonly number[]): AnalysisCoupon[] {
  const sqlite = sqliteOf(db);
  const dates = runDates(sqlite);
  const { clause: where, params } = rawWhere(f, dates, groups, onlyIds);
  const inner = COLUMNS.map((c, i) => `${c} as c${i}`).join(', ');
  const outer = COLUMNS.map((_c, i) => `json_group_array(c${i})`).join(', ');
  // The ordered subquery is not flattened into an aggregate, so the arrays come out in coupon id order.
  const row = prepare(sqlite, `select ${outer} from (select ${inner} from coupon_results cr ${where} order by cr.coupon_id)`)
    .raw(true)
    .get(...params) as string[];
  const col = row.map((json) => JSON.parse(json) as unknown[]) as Columns;
  const [ids, tags, trial, condition, run, speciesIds, resin, lot, isControl, board, thick, dry, cured, sg, wpg, loading, fill, maxWpg] = col;
  const [swelling, basis, hValue, hScale, problems] = [col[18], col[19], col[20], col[21], col[22]];
  const n = ids.length;
  for (let i = 1; i < n; i++) if ((ids[i] as number) <= (ids[i - 1] as number)) throw new Error('analysis load: rows out of coupon id order');

  const sp = speciesInfo(db);
  const resins = new Map<number, { name: string; density: number | null }>();
  for (const [id, name, density] of prepare(sqlite, 'select id, name, cured_density_g_cm3 from resins').raw(true).all() as [number, string, number | null][])
    resins.set(id, { name, density });
  const runCodes = new Map<number, string>();
  for (const [id, code] of prepare(sqlite, 'select id, code from runs').raw(true).all() as [number, string][]) runCodes.set(id, code);

  // ASE needs the controls of each trial and species that has treated coupons with a swelling.
  const trialIds = new Set<number>();
  for (let i = 0; i < n; i++) if (isControl[i] === 0 && trial[i] !== null && swelling[i] !== null) trialIds.add(trial[i] as number);
  const controls = new Map<string, { swellingPct: number | null; swellingBasis: 'volume' | 'mass' | null }[]>();
  if (trialIds.size > 0) {
    const ctl = prepare(
      sqlite,
      `select trial_id as trialId, species_id as speciesId, swelling_pct as swellingPct, swelling_basis as swellingBasis from coupon_results
       where role = 'control' and swelling_pct is not null and trial_id in (select value from json_each(?))`,
    ).all(JSON.stringify([...trialIds])) as { trialId: number; speciesId: number; swellingPct: number; swellingBasis: 'volume' | 'mass' | null }[];
    for (const c of ctl) {
      const k = `${c.trialId}|${c.speciesId}`;
      const list = controls.get(k);
      if (list) list.push(c);
      else controls.set(k, [c]);
    }
  }

  const out: AnalysisCoupon[] = new Array<AnalysisCoupon>(n);
  for (let i = 0; i < n; i++) {
    const speciesId = speciesIds[i] as number;
    const s = sp.get(speciesId);
    const resinId = resin[i] as number | null;
    const r = resinId === null ? undefined : resins.get(resinId);
    const runId = run[i] as number | null;
    const role = isControl[i] === 1 ? 'control' : 'treated';
    const trialId = trial[i] as number | null;
    const swellingPct = swelling[i] as number | null;
    // The efficiency against the controls is an ASE on dimensions and a WRE on mass (shared/coupons/metrics).
    let asePct: number | null = null;
    let wrePct: number | null = null;
    if (role === 'treated' && trialId !== null && swellingPct !== null) {
      const swellingBasis = basis[i] === 1 ? 'volume' : basis[i] === 2 ? 'mass' : null;
      const a = antiSwell({ swellingPct, swellingBasis }, controls.get(`${trialId}|${speciesId}`) ?? []);
      if (a?.measure === 'wre') wrePct = a.asePct;
      else if (a) asePct = a.asePct;
    }
    const blankReasons: Record<string, string> = {};
    const p = problems[i];
    if (p !== null && p !== undefined) for (const x of JSON.parse(p) as { metric: string; message: string }[]) blankReasons[x.metric] ??= x.message;
    out[i] = {
      id: ids[i] as number,
      tag: tags[i] as string,
      trialId,
      conditionId: condition[i] as number | null,
      runId,
      runCode: runId === null ? null : (runCodes.get(runId) ?? null),
      speciesId,
      speciesName: s?.name ?? `species ${speciesId}`,
      speciesOrigin: s?.origin ?? 'handbook',
      resinId,
      resinName: r?.name ?? null,
      resinDensityGcm3: r?.density ?? null,
      lotId: lot[i] as number | null,
      role,
      sourceBoard: board[i] as string | null,
      thicknessMm: thick[i] as number | null,
      dryMassG: dry[i] as number | null,
      curedMassG: cured[i] as number | null,
      drySg: sg[i] as number | null,
      referenceSg: s?.referenceSg ?? null,
      referenceSgCov: s?.cov ?? null,
      wpgPct: wpg[i] as number | null,
      resinLoadingKgM3: loading[i] as number | null,
      voidFillPct: fill[i] as number | null,
      maxWpgPct: maxWpg[i] as number | null,
      swellingPct,
      asePct,
      wrePct,
      hardnessValue: hValue[i] as number | null,
      hardnessScale: SCALES[(hScale[i] as number | null) ?? 0] ?? null,
      treatedOn: runId === null ? null : (dates.get(runId) ?? null),
      blankReasons,
    };
  }
  return out;
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

/** The coupons now in the given runs (ids of their results rows). */
export function couponIdsOfRuns(db: Db, runIds: readonly number[]): number[] {
  return prepare(sqliteOf(db), 'select coupon_id from coupon_results where run_id in (select value from json_each(?))')
    .pluck()
    .all(JSON.stringify(runIds)) as number[];
}

/** The treated coupons of the given trial × species pairs (their ASE and WRE rest on those controls). */
export function treatedOfTrialSpecies(db: Db, pairs: readonly { trialId: number; speciesId: number }[]): number[] {
  return prepare(
    sqliteOf(db),
    `select cr.coupon_id from json_each(?) p join coupon_results cr
       on cr.trial_id = json_extract(p.value, '$.trialId') and cr.species_id = json_extract(p.value, '$.speciesId')
     where cr.role = 'treated'`,
  )
    .pluck()
    .all(JSON.stringify(pairs)) as number[];
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
