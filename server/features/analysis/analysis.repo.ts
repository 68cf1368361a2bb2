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
import type { CouponColumns } from '../../../shared/analysis/columns';
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
 * Columns read per coupon, by name. Each comes back as ONE JSON array over all matching rows
 * (json_group_array), so better-sqlite3 hands over a few long strings instead of a hundred thousand row
 * arrays, and JSON.parse turns them into plain arrays in native code. SQLite writes reals with 17
 * significant digits, so every double round-trips exactly. A number column that may be null is sent
 * as its values with 0 for null (an array of numbers only, which V8 keeps unboxed, so no heap object per
 * value) and, beside it, the coupon ids where it is null. Names (species, resin, run code) are joined in
 * JavaScript from small maps, not per row in SQL.
 */
const NUMBERS = {
  id: 'cr.coupon_id',
  speciesId: 'cr.species_id',
  control: "cr.role = 'control'",
  swellingBasis: "case cr.swelling_basis when 'volume' then 1 when 'mass' then 2 else 0 end",
  hardnessScale: `coalesce(${HARDNESS_SCALE}, 0)`,
} as const;
/** Ids that may be null: an array of small integers and nulls is kept unboxed too, so they come as they are. */
const IDS = {
  trialId: 'cr.trial_id',
  conditionId: 'cr.condition_id',
  runId: 'cr.run_id',
  resinId: 'cr.resin_id',
  lotId: 'cr.resin_lot_id',
} as const;
const NULLABLE = {
  thicknessMm: 'cr.thickness_mm',
  drySg: 'cr.dry_sg',
  wpgPct: 'cr.wpg_pct',
  resinLoadingKgM3: 'cr.resin_loading_kg_m3',
  voidFillPct: 'cr.void_fill_pct',
  swellingPct: 'cr.swelling_pct',
  hardnessValue: HARDNESS_VALUE,
} as const;
const STRINGS = {
  sourceBoard: 'cr.source_board',
} as const;
type NumberName = keyof typeof NUMBERS;
type NullableName = keyof typeof NULLABLE;
type IdName = keyof typeof IDS;
type StringName = keyof typeof STRINGS;

/** The read statement's SELECT over the filtered, ordered rows, and the order of its results. */
function readSql(where: string): { sql: string; order: string[] } {
  const inner: string[] = [];
  const outer: string[] = [];
  const order: string[] = [];
  for (const [name, expr] of Object.entries({ ...NUMBERS, ...IDS })) {
    inner.push(`${expr} as ${name}`);
    outer.push(`json_group_array(${name})`);
    order.push(name);
  }
  for (const [name, expr] of Object.entries(NULLABLE)) {
    inner.push(`${expr} as ${name}`);
    outer.push(`json_group_array(coalesce(${name}, 0))`, `json_group_array(id) filter (where ${name} is null)`);
    order.push(name, `${name}:null`);
  }
  for (const [name, expr] of Object.entries(STRINGS)) {
    inner.push(`${expr} as ${name}`);
    outer.push(`json_group_array(${name})`);
    order.push(name);
  }
  // The ordered subquery is not flattened into an aggregate, so the arrays come out in coupon id order.
  return { sql: `select ${outer.join(', ')} from (select ${inner.join(', ')} from coupon_results cr ${where} order by cr.coupon_id)`, order };
}

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
 * A set of coupons read into columns (shared/analysis/columns.ts), with the names by id an object of it
 * shows (species, resins, runs and their dates, current at the read). `coupon(i)` makes the object the
 * analysis sees, reading the few things only an object shows (tag, masses, maximum WPG, blank reasons)
 * for that coupon then; objects are made only for what is shown, never one per coupon.
 */
export interface CouponTable extends CouponColumns {
  readonly trialId: Float64Array;
  /** Index into `boards`; −1 when none is named, −2 for an empty name (no board, as columnsOf counts it). */
  readonly board: Int32Array;
  readonly boards: readonly string[];
  readonly names: TableNames;
  /** The objects made so far, by position (the plot points and tables of one set ask for the same ones). */
  readonly made: Map<number, AnalysisCoupon>;
}

/** Names and reference values by id, read with a set (small tables, one entry per species, resin, run). */
interface TableNames {
  species: Map<number, SpeciesInfo>;
  resins: Map<number, { name: string; density: number | null }>;
  runCodes: Map<number, string>;
  dates: Map<number, string>;
  /** A coupon's tag, masses, maximum WPG and blank metrics, read when its object is made (see tableOf). */
  details: (id: number) => Details;
}

/** What only a coupon's object shows: its tag, dry and cured mass, maximum WPG, blank metrics (JSON as stored, null when none). */
type Details = [string, number | null, number | null, number | null, string | null];

/** The numeric columns of a CouponTable (one Float64Array each, NaN for null), in one list for merging. */
const FLOAT_COLUMNS = [
  'id',
  'trialId',
  'conditionId',
  'runId',
  'speciesId',
  'resinId',
  'lotId',
  'thicknessMm',
  'drySg',
  'referenceSg',
  'referenceSgCov',
  'wpgPct',
  'resinLoadingKgM3',
  'voidFillPct',
  'swellingPct',
  'asePct',
  'wrePct',
  'hardnessValue',
] as const satisfies readonly (keyof CouponTable)[];

type TableData = { -readonly [K in (typeof FLOAT_COLUMNS)[number]]: Float64Array } & {
  n: number;
  control: Uint8Array;
  hardnessScale: Uint8Array;
  board: Int32Array;
  boards: string[];
  names: TableNames;
};

const orNull = (v: number): number | null => (v === v ? v : null);

/**
 * The table with its `coupon(i)`: the same object, key for key, the analysis has always been given, made
 * once per position (`made`, kept from an earlier table when its positions and names still hold).
 */
function tableOf(t: TableData, made = new Map<number, AnalysisCoupon>()): CouponTable {
  const { species: sp, resins, runCodes, dates, details } = t.names;
  const coupon = (i: number): AnalysisCoupon => {
    let c = made.get(i);
    if (!c) made.set(i, (c = make(i)));
    return c;
  };
  const make = (i: number): AnalysisCoupon => {
    const speciesId = t.speciesId[i] as number;
    const s = sp.get(speciesId);
    const resinId = orNull(t.resinId[i] as number);
    const r = resinId === null ? undefined : resins.get(resinId);
    const runId = orNull(t.runId[i] as number);
    const b = t.board[i] as number;
    const id = t.id[i] as number;
    const [tag, dryMassG, curedMassG, maxWpgPct, p] = details(id);
    const blankReasons: Record<string, string> = {};
    if (p !== null && p !== undefined) for (const x of JSON.parse(p) as { metric: string; message: string }[]) blankReasons[x.metric] ??= x.message;
    return {
      id,
      tag,
      trialId: orNull(t.trialId[i] as number),
      conditionId: orNull(t.conditionId[i] as number),
      runId,
      runCode: runId === null ? null : (runCodes.get(runId) ?? null),
      speciesId,
      speciesName: s?.name ?? `species ${speciesId}`,
      speciesOrigin: s?.origin ?? 'handbook',
      resinId,
      resinName: r?.name ?? null,
      resinDensityGcm3: r?.density ?? null,
      lotId: orNull(t.lotId[i] as number),
      role: t.control[i] === 1 ? 'control' : 'treated',
      sourceBoard: b >= 0 ? (t.boards[b] as string) : b === -2 ? '' : null,
      thicknessMm: orNull(t.thicknessMm[i] as number),
      dryMassG,
      curedMassG,
      drySg: orNull(t.drySg[i] as number),
      referenceSg: s?.referenceSg ?? null,
      referenceSgCov: s?.cov ?? null,
      wpgPct: orNull(t.wpgPct[i] as number),
      resinLoadingKgM3: orNull(t.resinLoadingKgM3[i] as number),
      voidFillPct: orNull(t.voidFillPct[i] as number),
      maxWpgPct,
      swellingPct: orNull(t.swellingPct[i] as number),
      asePct: orNull(t.asePct[i] as number),
      wrePct: orNull(t.wrePct[i] as number),
      hardnessValue: orNull(t.hardnessValue[i] as number),
      hardnessScale: SCALES[t.hardnessScale[i] as number] ?? null,
      treatedOn: runId === null ? null : (dates.get(runId) ?? null),
      blankReasons,
    };
  };
  return { ...t, coupon, made };
}

/**
 * A coupon's details, read by id when its object is made. Objects are made only while the set is current
 * (right after the version check, in the same synchronous request), so the row read is the one the set's
 * numbers came from; a coupon gone meanwhile (another connection) shows no details, and that write gives
 * a new version, so the answer is computed again on the next request.
 */
function detailsOf(sqlite: Database.Database): (id: number) => Details {
  const st = prepare(
    sqlite,
    'select tag, dry_mass_g, cured_mass_g, max_wpg_pct, case when problem_count > 0 then problems end from coupon_results where coupon_id = ?',
  ).raw(true);
  return (id) => (st.get(id) as Details | undefined) ?? ['', null, null, null, null];
}

/**
 * The results rows matching the filters, as the analysis sees them, in coupon id order, as columns: one
 * statement over coupon_results, read column by column into typed arrays; with `groups`, only the coupons
 * in one of the groups; with `onlyIds`, only those coupons (to bring a held set up to date after a few
 * writes). ASE is taken against the controls of the same trial and species whatever the filters (a role
 * filter must not remove the controls a treated coupon is judged against).
 */
export function loadCouponTable(db: Db, f: AnalysisFilters, groups?: readonly GroupSpec[], onlyIds?: readonly number[]): CouponTable {
  const sqlite = sqliteOf(db);
  const dates = runDates(sqlite);
  const { clause: where, params } = rawWhere(f, dates, groups, onlyIds);
  const { sql, order } = readSql(where);
  const parsed = new Map<string, unknown[]>();
  (
    prepare(sqlite, sql)
      .raw(true)
      .get(...params) as string[]
  ).forEach((json, i) => parsed.set(order[i] as string, JSON.parse(json) as unknown[]));
  const numbers = (name: NumberName) => parsed.get(name) as number[];
  const strings = (name: StringName) => parsed.get(name) as (string | null)[];
  const ids = numbers('id');
  const n = ids.length;
  for (let i = 1; i < n; i++) if ((ids[i] as number) <= (ids[i - 1] as number)) throw new Error('analysis load: rows out of coupon id order');
  /** A nullable column as a Float64Array, NaN at the coupons listed as null (both lists are in id order). */
  const floats = (name: NullableName): Float64Array => {
    const a = Float64Array.from(parsed.get(name) as number[]);
    const nulls = parsed.get(`${name}:null`) as number[];
    let p = 0;
    for (const id of nulls) {
      while (ids[p] !== id) p++;
      a[p] = Number.NaN;
    }
    return a;
  };
  /** A nullable id column as a Float64Array, NaN for null. */
  const idColumn = (name: IdName): Float64Array => {
    const from = parsed.get(name) as (number | null)[];
    const a = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const v = from[i];
      a[i] = v === null || v === undefined ? Number.NaN : v;
    }
    return a;
  };
  const trial = idColumn('trialId');
  const swelling = floats('swellingPct');
  const isControl = numbers('control');
  const speciesIds = numbers('speciesId');

  const sp = speciesInfo(db);
  const resins = new Map<number, { name: string; density: number | null }>();
  for (const [id, name, density] of prepare(sqlite, 'select id, name, cured_density_g_cm3 from resins').raw(true).all() as [number, string, number | null][])
    resins.set(id, { name, density });
  const runCodes = new Map<number, string>();
  for (const [id, code] of prepare(sqlite, 'select id, code from runs').raw(true).all() as [number, string][]) runCodes.set(id, code);

  // ASE needs the controls of each trial and species that has treated coupons with a swelling.
  const trialIds = new Set<number>();
  for (let i = 0; i < n; i++) if (isControl[i] === 0 && trial[i] === trial[i] && swelling[i] === swelling[i]) trialIds.add(trial[i] as number);
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

  const hValue = floats('hardnessValue');
  const hScale = numbers('hardnessScale');
  const basis = numbers('swellingBasis');
  const board = strings('sourceBoard');
  const t: TableData = {
    n,
    id: Float64Array.from(ids),
    trialId: trial,
    conditionId: idColumn('conditionId'),
    runId: idColumn('runId'),
    speciesId: Float64Array.from(speciesIds),
    resinId: idColumn('resinId'),
    lotId: idColumn('lotId'),
    control: new Uint8Array(n),
    board: new Int32Array(n),
    boards: [],
    thicknessMm: floats('thicknessMm'),
    drySg: floats('drySg'),
    referenceSg: new Float64Array(n),
    referenceSgCov: new Float64Array(n),
    wpgPct: floats('wpgPct'),
    resinLoadingKgM3: floats('resinLoadingKgM3'),
    voidFillPct: floats('voidFillPct'),
    swellingPct: swelling,
    asePct: new Float64Array(n).fill(Number.NaN),
    wrePct: new Float64Array(n).fill(Number.NaN),
    hardnessValue: hValue,
    hardnessScale: new Uint8Array(n),
    names: { species: sp, resins, runCodes, dates, details: detailsOf(sqlite) },
  };
  const boardIndex = new Map<string, number>();
  for (let i = 0; i < n; i++) {
    const speciesId = speciesIds[i] as number;
    const s = sp.get(speciesId);
    t.referenceSg[i] = s?.referenceSg ?? Number.NaN;
    t.referenceSgCov[i] = s?.cov ?? Number.NaN;
    const control = isControl[i] === 1;
    t.control[i] = control ? 1 : 0;
    const name = board[i];
    if (name) {
      let b = boardIndex.get(name);
      if (b === undefined) {
        boardIndex.set(name, (b = t.boards.length));
        t.boards.push(name);
      }
      t.board[i] = b;
    } else t.board[i] = name === '' ? -2 : -1;
    // A value without a scale is no hardness (the load query gives both or neither).
    const scale = hScale[i] as number;
    const value = hValue[i] as number;
    t.hardnessScale[i] = value === value ? scale : 0;
    if (scale === 0) hValue[i] = Number.NaN;
    // The efficiency against the controls is an ASE on dimensions and a WRE on mass (shared/coupons/metrics).
    const trialId = trial[i] as number;
    const swellingPct = swelling[i] as number;
    if (!control && trialId === trialId && swellingPct === swellingPct) {
      const swellingBasis = basis[i] === 1 ? 'volume' : basis[i] === 2 ? 'mass' : null;
      const a = antiSwell({ swellingPct, swellingBasis }, controls.get(`${trialId}|${speciesId}`) ?? []);
      if (a?.measure === 'wre') t.wrePct[i] = a.asePct;
      else if (a) t.asePct[i] = a.asePct;
    }
  }
  return tableOf(t);
}

/** The coupons of loadCouponTable as objects (for the few callers that want them all). */
export function loadAnalysisCoupons(db: Db, f: AnalysisFilters, groups?: readonly GroupSpec[], onlyIds?: readonly number[]): AnalysisCoupon[] {
  const t = loadCouponTable(db, f, groups, onlyIds);
  return Array.from({ length: t.n }, (_x, i) => t.coupon(i));
}

/**
 * A held table brought up to date with `fresh`, the rows just read again for the coupon ids `ids` (sorted):
 * a coupon of `ids` is taken from `fresh`, or dropped when it is not there (it left the filters or was
 * deleted); every other coupon is kept. Names and the species' reference values are the fresh read's
 * (current), so a write to species or resins needs no row read again. When the coupons are the
 * same ones in the same places, `old`'s arrays are rewritten at those places only and taken over (`old`
 * must not be used afterwards); otherwise the columns are gathered anew.
 */
export function mergeTables(old: CouponTable, fresh: CouponTable, ids: readonly number[], namesChanged: boolean): CouponTable {
  const gone = new Set(ids);
  // Where each row of the result comes from: p ≥ 0 the old row p, p < 0 the fresh row −1 − p.
  const from: number[] = [];
  let inPlace = true;
  let j = 0;
  for (let p = 0; p < old.n; p++) {
    const id = old.id[p] as number;
    while (j < fresh.n && (fresh.id[j] as number) < id) {
      inPlace = false;
      from.push(-1 - j++);
    }
    if (!gone.has(id)) from.push(p);
    else if (j < fresh.n && fresh.id[j] === id) from.push(-1 - j++);
    else inPlace = false;
  }
  if (j < fresh.n) inPlace = false;
  while (j < fresh.n) from.push(-1 - j++);

  // Fresh boards in the old numbering (names met for the first time are added).
  const boards = [...old.boards];
  const boardIndex = new Map(boards.map((b, i) => [b, i]));
  const boardOf = (b: number): number => {
    if (b < 0) return b;
    const name = fresh.boards[b] as string;
    let k = boardIndex.get(name);
    if (k === undefined) {
      boardIndex.set(name, (k = boards.length));
      boards.push(name);
    }
    return k;
  };
  if (inPlace) {
    const t = { ...old, boards, names: fresh.names } as TableData;
    for (let p = 0; p < from.length; p++) {
      const f = from[p] as number;
      if (f >= 0) continue;
      const q = -1 - f;
      for (const k of FLOAT_COLUMNS) t[k][p] = fresh[k][q] as number;
      t.control[p] = fresh.control[q] as number;
      t.hardnessScale[p] = fresh.hardnessScale[q] as number;
      t.board[p] = boardOf(fresh.board[q] as number);
      old.made.delete(p);
    }
    // The objects already made stay good where their row was kept, unless the names changed.
    return tableOf(withReference(t), namesChanged ? undefined : old.made);
  }
  const m = from.length;
  const gather = <A extends Float64Array | Uint8Array | Int32Array>(a: A, b: A, make: (n: number) => A, map?: (v: number) => number): A => {
    const out = make(m);
    for (let p = 0; p < m; p++) {
      const f = from[p] as number;
      out[p] = f >= 0 ? (a[f] as number) : map ? map(b[-1 - f] as number) : (b[-1 - f] as number);
    }
    return out;
  };
  const f64 = (k: number) => new Float64Array(k);
  const u8 = (k: number) => new Uint8Array(k);
  const t = {
    n: m,
    control: gather(old.control, fresh.control, u8),
    hardnessScale: gather(old.hardnessScale, fresh.hardnessScale, u8),
    board: gather(old.board, fresh.board, (k) => new Int32Array(k), boardOf),
    boards,
    names: fresh.names,
  } as TableData;
  for (const k of FLOAT_COLUMNS) t[k] = gather(old[k], fresh[k], f64);
  return tableOf(withReference(t));
}

/** The species' reference SG and its spread written again for every coupon, from the table's (current) names. */
function withReference(t: TableData): TableData {
  const sp = t.names.species;
  for (let i = 0; i < t.n; i++) {
    const s = sp.get(t.speciesId[i] as number);
    t.referenceSg[i] = s?.referenceSg ?? Number.NaN;
    t.referenceSgCov[i] = s?.cov ?? Number.NaN;
  }
  return t;
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
