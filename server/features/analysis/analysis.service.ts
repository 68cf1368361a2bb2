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
import { findEvidence, insertEvidence, listEvidence, loadAnalysisCoupons, loadHistory, runExists, wpgValues, type EvidenceRow } from './analysis.repo';

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

export function createAnalysisService(deps: { db: Db; now: () => Date }) {
  const { db } = deps;

  function overview(filters: AnalysisFilters, sgBasis: SgBasis): Overview {
    return buildOverview(loadAnalysisCoupons(db, filters), sgBasis);
  }

  function compare(filters: AnalysisFilters, a: GroupSpec, b: GroupSpec, metric: CompareMetric): CompareResult {
    return compareGroups(loadAnalysisCoupons(db, filters), a, b, metric);
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
    const all = loadAnalysisCoupons(db, filters);
    const o = buildOverview(all, 'measured');
    return { items: all.slice((page - 1) * pageSize, page * pageSize), page, pageSize, total: all.length, excluded: o.excluded };
  }

  function runExpected(runId: number): RunExpected {
    if (!runExists(db, runId)) throw new NotFound('Run not found');
    const inRun = loadAnalysisCoupons(db, { runId: [runId] });
    const pairs = new Map<string, { speciesId: number; resinId: number }>();
    for (const c of inRun) if (c.resinId !== null) pairs.set(`${c.speciesId}|${c.resinId}`, { speciesId: c.speciesId, resinId: c.resinId });
    return expectedForRun(runId, inRun, loadHistory(db, [...pairs.values()], runId));
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
    const rows = loadAnalysisCoupons(db, view.filters);
    const o = buildOverview(rows, view.sgBasis);
    const c = view.compare ? compareGroups(rows, view.compare.a, view.compare.b, view.compare.metric) : null;
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

  return { overview, compare, fit, coupons, runExpected, sampleSize, saveEvidence, getEvidence, evidenceList, snapshotOf };
}
export type AnalysisService = ReturnType<typeof createAnalysisService>;
