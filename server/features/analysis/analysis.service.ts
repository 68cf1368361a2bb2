import crypto from 'node:crypto';
import type { Db } from '../../db/client';
import { NotFound, Unprocessable } from '../../http/errors';
import { DomainError } from '../../../shared/domain/errors';
import { twoSampleSampleSize } from '../../../shared/domain/power';
import { compareGroups } from '../../../shared/analysis/compare';
import { expectedForRun } from '../../../shared/analysis/expected';
import { buildOverview } from '../../../shared/analysis/overview';
import { statsOf } from '../../../shared/analysis/stats';
import type { User } from '../../../shared/schemas/auth';
import type {
  AnalysisCoupon,
  AnalysisFilters,
  CompareMetric,
  CompareResult,
  CreateEvidenceInput,
  EvidenceResponse,
  EvidenceSnapshot,
  EvidenceView,
  FitModel,
  GroupSpec,
  Overview,
  RunExpected,
  SampleSize,
  SgBasis,
} from '../../../shared/schemas/analysis';
import { evidenceViewSchema } from '../../../shared/schemas/analysis';
import { createDataVersion, keyOf, Lru } from './analysis.cache';
import {
  couponIdsOfRuns,
  treatedOfTrialSpecies,
  findEvidence,
  insertEvidence,
  listEvidence,
  loadCouponTable,
  loadHistory,
  mergeTables,
  runExists,
  wpgValues,
  type CouponTable,
  type EvidenceRow,
} from './analysis.repo';

/**
 * Spread of WPG within one species × resin assumed when the shop has fewer than 3 coupons of it:
 * 8 percentage points. Own assumption (stated on the screen), to be replaced by the shop's own spread.
 */
export const DEFAULT_WPG_SD = 8;

/** SHA-256 of the numbers in a canonical form (object keys sorted), so equal numbers give equal prints. */
export function fingerprintOf(value: unknown): string {
  const canonical = JSON.stringify(value, (_k, v: unknown) =>
    v && typeof v === 'object' && !Array.isArray(v)
      ? Object.fromEntries(Object.entries(v as Record<string, unknown>).sort(([a], [b]) => a.localeCompare(b)))
      : v,
  );
  return crypto.createHash('sha256').update(canonical).digest('hex');
}

/** A filtered set of coupons held for a data version, as columns. */
interface HeldSet {
  version: string;
  table: CouponTable;
}

/** How many filtered coupon lists and how many computed answers are kept (a coupon list of 100k is tens of MB). */
const CACHED_ROW_SETS = 3;
/** Past this many results rows written since a held set was read, it is read afresh rather than patched. */
const PATCH_LIMIT = 5000;
/** Rows of the change log kept (a set older than these is read afresh); a few hundred kB of temp table. */
const LOG_KEPT = 4 * PATCH_LIMIT;
const CACHED_ANSWERS = 32;

/**
 * The analysis over the results table. Answers are cached, keyed by what was asked and by the version of
 * the data they were read from (analysis.cache.ts): a repeated view costs a version check, and any write
 * to a table an answer reads gives a new version, so a stale answer is never served. Cached answers are
 * shared between callers and must not be changed by them.
 */
export function createAnalysisService(deps: { db: Db; now: () => Date }) {
  const { db } = deps;
  const version = createDataVersion((db as Db & { $client: Parameters<typeof createDataVersion>[0] }).$client);
  const rowSets = new Lru<HeldSet>(CACHED_ROW_SETS);
  const answers = new Lru<{ version: string; value: unknown }>(CACHED_ANSWERS);

  /**
   * The coupons matching the filters, read once per data version, as columns. With `groups` (a
   * comparison), the coupons of the full filters are used when they are already in hand, else only the
   * groups' coupons are read.
   */
  function columnsFor(filters: AnalysisFilters, groups?: readonly GroupSpec[]): CouponTable {
    const v = version();
    // The full filtered set, when one is held (even from an older version: a patch is cheap).
    if (!groups || rowSets.get(keyOf(filters))) return held(keyOf(filters), v, filters).table;
    return held(keyOf({ filters, groups }), v, filters, groups).table;
  }

  /** Coupons of a set as objects, from position `from` up to `to` (all by default). */
  function objectsOf(t: CouponTable, from = 0, to = Infinity): AnalysisCoupon[] {
    const out: AnalysisCoupon[] = [];
    for (let i = Math.max(0, from); i < Math.min(t.n, to); i++) out.push(t.coupon(i));
    return out;
  }

  /**
   * A held set of coupons brought up to version `v`: as it is when nothing changed; patched when only a
   * few results rows were written through this connection since it was read (those coupons are read again
   * with the same filters and put in place, the rest are kept); read afresh otherwise.
   */
  function held(key: string, v: string, filters: AnalysisFilters, groups?: readonly GroupSpec[]): HeldSet {
    const hit = rowSets.get(key);
    if (hit && hit.version === v) return hit;
    const table = (hit && patched(hit, filters, groups)) ?? loadCouponTable(db, filters, groups);
    const set: HeldSet = { version: v, table };
    rowSets.set(key, set);
    version.prune(LOG_KEPT);
    return set;
  }

  /**
   * The held coupons with those written since read again (and those whose numbers rest on them: a run's
   * coupons, a control's treated coupons), or null when a patch would not be exact: the filters have a
   * date range (a treated coupon or a run's dates decide whether a trial's controls are in), or the log
   * cannot tell which coupons changed (another connection, too many rows). After species or resins are
   * written, the rows are kept and the names and reference values taken anew.
   */
  function patched(hit: HeldSet, filters: AnalysisFilters, groups?: readonly GroupSpec[]): CouponTable | null {
    if (filters.from !== undefined || filters.to !== undefined) return null;
    const changed = version.changedSince(hit.version, PATCH_LIMIT);
    if (changed === null) return null;
    // Species or resins written: names and reference values are read with the patch (mergeTables takes
    // them), but a species' origin decides which coupons an origin filter holds, so that set is read afresh.
    if (changed.names && filters.speciesOrigin !== undefined) return null;
    const old = hit.table;
    // A run or its stages changed: its coupons' run code and treated date follow it, so they are read again.
    const runIds = new Set(changed.runIds);
    const ofRuns = runIds.size > 0 ? couponIdsOfRuns(db, [...runIds]) : [];
    if (runIds.size > 0) for (let i = 0; i < old.n; i++) if (runIds.has(old.runId[i] as number)) ofRuns.push(old.id[i] as number);
    // A control changed (in or out of these filters: a resin filter leaves every control out): the treated
    // coupons of its trial and species have their ASE and WRE against it, so they are read again too.
    // Hardness gain is worked out from the controls' columns when the table is made; nothing else rests on one.
    const ofControls = changed.controlPairs.length > 0 ? treatedOfTrialSpecies(db, changed.controlPairs) : [];
    const ids = [...new Set([...changed.couponIds, ...ofRuns, ...ofControls])].sort((x, y) => x - y);
    if (ids.length > PATCH_LIMIT) return null;
    // The old table's arrays may be rewritten in place: the caller puts the result in the set's place.
    return mergeTables(old, loadCouponTable(db, filters, groups, ids), ids, changed.names);
  }

  /** An answer computed once per question and data version. */
  function cached<T>(question: unknown, compute: () => T): T {
    const v = version();
    const k = keyOf(question);
    const hit = answers.get(k);
    if (hit && hit.version === v) return hit.value as T;
    const value = compute();
    answers.set(k, { version: v, value });
    return value;
  }

  function overview(filters: AnalysisFilters, sgBasis: SgBasis): Overview {
    return cached({ q: 'overview', filters, sgBasis }, () => buildOverview(columnsFor(filters), sgBasis));
  }

  function compare(filters: AnalysisFilters, a: GroupSpec, b: GroupSpec, metric: CompareMetric): CompareResult {
    return cached({ q: 'compare', filters, a, b, metric }, () => compareGroups(columnsFor(filters, [a, b]), a, b, metric));
  }

  function fit(filters: AnalysisFilters, sgBasis: SgBasis, model: FitModel) {
    const o = overview(filters, sgBasis);
    const f = model === 'density' ? o.densityFit : model === 'thickness' ? o.thicknessFit : o.multipleFit;
    return {
      fit: f,
      notes: o.fitNotes,
      excluded: o.excluded,
      theoreticalMax: model === 'density' ? o.theoreticalMax : [],
      points: model === 'thickness' ? o.plots.wpgVsThickness : o.plots.wpgVsSg,
      outliers: o.outliers,
    };
  }

  function coupons(filters: AnalysisFilters, page: number, pageSize: number) {
    const t = columnsFor(filters);
    const o = overview(filters, 'measured');
    return { items: objectsOf(t, (page - 1) * pageSize, page * pageSize), page, pageSize, total: t.n, excluded: o.excluded };
  }

  function runExpected(runId: number): RunExpected {
    if (!runExists(db, runId)) throw new NotFound('Run not found');
    return cached({ q: 'expected', runId }, () => {
      const inRun = objectsOf(columnsFor({ runId: [runId] }));
      const pairs = new Map<string, { speciesId: number; resinId: number }>();
      for (const c of inRun) if (c.resinId !== null) pairs.set(`${c.speciesId}|${c.resinId}`, { speciesId: c.speciesId, resinId: c.resinId });
      return expectedForRun(runId, inRun, loadHistory(db, [...pairs.values()], runId));
    });
  }

  function sampleSize(q: { speciesId?: number | undefined; resinId?: number | undefined; differencePct: number; planned?: number | undefined }): SampleSize {
    const values = q.speciesId !== undefined || q.resinId !== undefined ? wpgValues(db, q.speciesId, q.resinId) : [];
    const s = values.length >= 3 ? statsOf(values) : null;
    const shop = s?.sd != null && s.sd > 0;
    const sd = shop ? (s?.sd as number) : DEFAULT_WPG_SD;
    let r;
    try {
      r = twoSampleSampleSize(q.differencePct, sd, 0.8, 0.05);
    } catch (e) {
      if (e instanceof DomainError) throw new Unprocessable(e.message, { differencePct: [e.message] });
      throw e;
    }
    const sdNote = shop
      ? `SD ${sd.toFixed(1)} points of WPG, from the shop's ${values.length} coupons of this species and resin`
      : `SD ${sd.toFixed(1)} points of WPG, a stated default: the shop has fewer than 3 coupons of this species and resin`;
    const warning =
      q.planned !== undefined && q.planned < r.nPerGroup
        ? `The plan has ${q.planned} coupon${q.planned === 1 ? '' : 's'} per condition; a difference of ${q.differencePct} points needs ${r.nPerGroup} to be found 8 times in 10.`
        : null;
    return {
      nPerCondition: r.nPerGroup,
      differencePct: q.differencePct,
      sd,
      sdSource: shop ? 'shop' : 'default',
      sdNote,
      power: r.power,
      alpha: 0.05,
      warning,
    };
  }

  /** The numbers and plot of a view, computed now from the results table. */
  function snapshotOf(view: EvidenceView): { snapshot: EvidenceSnapshot; fingerprint: string } {
    const o = overview(view.filters, view.sgBasis);
    const c = view.compare ? compare(view.filters, view.compare.a, view.compare.b, view.compare.metric) : null;
    const numbers = { overview: o, compare: c };
    const sgLabel = view.sgBasis === 'measured' ? "Oven-dry SG (coupon's own)" : "Oven-dry SG (species' handbook value)";
    return {
      fingerprint: fingerprintOf(numbers),
      snapshot: {
        version: 1,
        computedAt: deps.now().toISOString(),
        numbers,
        plot: {
          spec: {
            kind: 'wpg-vs-sg',
            x: { label: sgLabel },
            y: { label: 'WPG (%)' },
            colorBy: 'species',
            symbolBy: 'resin',
            caption: o.densityFit?.sentence ?? o.fitNotes.join(' '),
          },
          data: o.plots.wpgVsSg,
        },
      },
    };
  }

  function toResponse(row: EvidenceRow, authorName: string | null): EvidenceResponse {
    const now = snapshotOf(evidenceViewSchema.parse(row.view));
    return {
      evidence: {
        id: row.id,
        title: row.title,
        note: row.note,
        view: row.view,
        snapshot: row.snapshot,
        fingerprint: row.fingerprint,
        createdAt: row.createdAt,
        createdBy: row.createdBy !== null && authorName !== null ? { id: row.createdBy, name: authorName } : null,
      },
      newerAnswer: { exists: now.fingerprint !== row.fingerprint, currentFingerprint: now.fingerprint, checkedAt: deps.now().toISOString() },
    };
  }

  function saveEvidence(user: User, input: CreateEvidenceInput): EvidenceResponse {
    const { snapshot, fingerprint } = snapshotOf(input.view);
    const row = insertEvidence(db, { title: input.title, note: input.note ?? null, view: input.view, snapshot, fingerprint, createdBy: user.id });
    return toResponse(row, user.name);
  }

  function getEvidence(id: number): EvidenceResponse {
    const found = findEvidence(db, id);
    if (!found) throw new NotFound('Saved view not found');
    return toResponse(found.e, found.authorName);
  }

  function evidenceList(page: number, pageSize: number) {
    return { ...listEvidence(db, page, pageSize), page, pageSize };
  }

  return { overview, compare, fit, coupons, runExpected, sampleSize, saveEvidence, getEvidence, evidenceList, snapshotOf, dataVersion: version };
}
export type AnalysisService = ReturnType<typeof createAnalysisService>;
