import { useState } from 'react';
import type { AnalysisFilters, CompareMetric, CompareResult, GroupRow, GroupSpec } from '../../../../shared/schemas/analysis';
import { COMPARE_METRICS, COMPARE_METRIC_LABELS } from '../../../../shared/schemas/analysis';
import { ErrorNote } from '../../../components/ui/page';
import { useCompare } from '../api/analysis-queries';

const keyOf = (g: Pick<GroupRow, 'speciesId' | 'resinId'>) => `${g.speciesId}|${g.resinId ?? ''}`;

/** A default pair: two resins on the same species, if the table has one. */
function defaultPair(groups: GroupRow[]): [string, string] {
  for (const a of groups) for (const b of groups) if (a !== b && a.speciesId === b.speciesId) return [keyOf(a), keyOf(b)];
  return [groups[0] ? keyOf(groups[0]) : '', groups[1] ? keyOf(groups[1]) : ''];
}

function spec(groups: GroupRow[], key: string): GroupSpec | null {
  const g = groups.find((x) => keyOf(x) === key);
  if (!g) return null;
  return { label: `${g.resinName ?? 'no resin'} in ${g.speciesName}`, speciesId: g.speciesId, ...(g.resinId !== null ? { resinId: g.resinId } : {}) };
}

const f = (v: number, d = 2) => (v < 0 ? `−${Math.abs(v).toFixed(d)}` : v.toFixed(d));
const p = (v: number) => (v < 0.001 ? '< 0.001' : v.toPrecision(2));

export function TwoGroupCompare({
  groups,
  filters,
  onResult,
}: {
  groups: GroupRow[];
  filters: AnalysisFilters;
  onResult?: (r: { a: GroupSpec; b: GroupSpec; metric: CompareMetric } | null) => void;
}) {
  const [initialA, initialB] = defaultPair(groups);
  const [a, setA] = useState(initialA);
  const [b, setB] = useState(initialB);
  const [metric, setMetric] = useState<CompareMetric>('wpgPct');
  const compare = useCompare();
  const options = groups.map((g) => (
    <option key={keyOf(g)} value={keyOf(g)}>
      {g.resinName ?? 'no resin'} in {g.speciesName} ({g.nCoupons})
    </option>
  ));

  const run = () => {
    const sa = spec(groups, a);
    const sb = spec(groups, b);
    if (!sa || !sb) return;
    compare.mutate({ filters, a: sa, b: sb, metric });
    onResult?.({ a: sa, b: sb, metric });
  };

  return (
    <section aria-labelledby="two-group-h" className="sheet mb-8 p-4">
      <h2 id="two-group-h">Compare two groups</h2>
      {groups.length < 2 ? (
        <p className="text-ink-soft">The filters leave fewer than two species × resin groups to compare.</p>
      ) : (
        <form
          className="mt-2 flex flex-wrap items-end gap-3"
          onSubmit={(e) => {
            e.preventDefault();
            run();
          }}
        >
          <label className="flex flex-col text-sm">
            Group A
            <select value={a} onChange={(e) => setA(e.target.value)}>
              {options}
            </select>
          </label>
          <label className="flex flex-col text-sm">
            Group B
            <select value={b} onChange={(e) => setB(e.target.value)}>
              {options}
            </select>
          </label>
          <label className="flex flex-col text-sm">
            Measure
            <select value={metric} onChange={(e) => setMetric(e.target.value as CompareMetric)}>
              {COMPARE_METRICS.map((m) => (
                <option key={m} value={m}>
                  {COMPARE_METRIC_LABELS[m].label}
                </option>
              ))}
            </select>
          </label>
          <button type="submit" className="btn-primary" disabled={compare.isPending || a === b}>
            Compare
          </button>
        </form>
      )}
      {compare.isError && <ErrorNote error={compare.error} />}
      {compare.data && <CompareReadout r={compare.data} />}
    </section>
  );
}

export function CompareReadout({ r }: { r: CompareResult }) {
  const u = r.unit ? ` ${r.unit}` : '';
  return (
    <div className="mt-4" data-testid="compare-result">
      <p className="mb-3 max-w-3xl text-base">{r.sentence}</p>
      {r.warnings.length > 0 && (
        <ul className="mb-3 rounded border border-amber/60 bg-amber/10 px-4 py-2 text-sm">
          {r.warnings.map((w) => (
            <li key={w}>{w}</li>
          ))}
        </ul>
      )}
      <table className="data-table mb-2">
        <caption className="sr-only">Two-group comparison</caption>
        <thead>
          <tr>
            <th scope="col">Test on</th>
            <th scope="col">n (A / B)</th>
            <th scope="col">Difference A − B{u}</th>
            <th scope="col">95 % CI</th>
            <th scope="col">Welch t</th>
            <th scope="col">df</th>
            <th scope="col">p</th>
            <th scope="col">
              Hedges' g<span className="block text-xs font-normal">(J-corrected, pooled SD)</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {r.welch && (
            <tr>
              <th scope="row" className="text-left font-normal">
                coupons{r.trust === 'coupons' ? ' (read this)' : ''}
              </th>
              <td>
                {r.a.n} / {r.b.n}
              </td>
              <td>{f(r.welch.meanDiff)}</td>
              <td>
                {f(r.welch.ci95[0])} to {f(r.welch.ci95[1])}
              </td>
              <td>{f(r.welch.t)}</td>
              <td>{r.welch.df.toFixed(1)}</td>
              <td>{p(r.welch.p)}</td>
              <td>
                <HedgesG g={r.welch} unit={u} />
              </td>
            </tr>
          )}
          {r.boardMeans && (
            <tr>
              <th scope="row" className="text-left font-normal">
                board means (read this)
              </th>
              <td>
                {r.boardMeans.nA} / {r.boardMeans.nB}
              </td>
              <td>{f(r.boardMeans.meanDiff)}</td>
              <td>
                {f(r.boardMeans.ci95[0])} to {f(r.boardMeans.ci95[1])}
              </td>
              <td>{f(r.boardMeans.t)}</td>
              <td>{r.boardMeans.df.toFixed(1)}</td>
              <td>{p(r.boardMeans.p)}</td>
              <td>
                <HedgesG g={r.boardMeans} unit={u} />
              </td>
            </tr>
          )}
        </tbody>
      </table>
      <p className="text-xs text-ink-soft">
        {r.a.label}: mean {f(r.a.mean)}, SD {f(r.a.sd)}; {r.b.label}: mean {f(r.b.mean)}, SD {f(r.b.sd)}. {r.effectSizeNote}{' '}
        {r.trust === 'board-means'
          ? 'Coupons cut from one source board are not independent, so the test on board means is the one to trust.'
          : 'Each coupon comes from its own board (or none is named), so the test on coupons stands.'}
      </p>
    </div>
  );
}

/** Hedges' g with the correction factor and standardizer it was made with, so it is never read bare. */
function HedgesG({ g, unit }: { g: { hedgesG: number; hedgesCorrection: number; pooledSd: number }; unit: string }) {
  return (
    <>
      {f(g.hedgesG)}
      <span className="block text-xs text-ink-soft">
        J = {g.hedgesCorrection.toFixed(3)}, pooled SD {f(g.pooledSd)}
        {unit}
      </span>
    </>
  );
}
