import { useQuery } from '@tanstack/react-query';
import { paths } from '../../../config/paths';
import { Link } from 'react-router-dom';
import { runExpectedQuery } from '../api/run-expected-query';

const f = (v: number | null, d = 1) => (v === null ? '—' : v < 0 ? `−${Math.abs(v).toFixed(d)}` : v.toFixed(d));

/** Actual uptake against the shop's own expectation for each coupon of the run, and a flag when the whole run fell short. */
export function RunExpected({ runId }: { runId: number }) {
  const q = useQuery(runExpectedQuery(runId));
  if (!q.data) return null;
  const r = q.data;
  const tone = r.run.status === 'short' ? 'border-margin/50 bg-margin/10' : 'border-rule';
  return (
    <section aria-labelledby="expected-heading" className="sheet mt-6 p-5">
      <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="expected-heading">Uptake against expected</h2>
        <Link to={paths.compare.href({ runId })}>This run in Compare</Link>
      </div>
      <p role="status" className={`mb-3 rounded border px-3 py-2 ${tone}`} data-testid="run-expected-status">
        {r.run.status === 'short' && <strong>Fell short. </strong>}
        {r.run.message}
      </p>
      {r.coupons.length > 0 && (
        <div className="overflow-x-auto">
          <table className="data-table">
            <caption className="sr-only">Each treated coupon's WPG against the WPG the shop's history predicts</caption>
            <thead>
              <tr>
                <th scope="col">Coupon</th>
                <th scope="col">Species · resin</th>
                <th scope="col">Actual WPG %</th>
                <th scope="col">Expected WPG %</th>
                <th scope="col">Difference %</th>
              </tr>
            </thead>
            <tbody>
              {r.coupons.map((c) => (
                <tr key={c.id}>
                  <th scope="row" className="text-left font-normal">
                    <Link to={paths.coupon.href({ id: c.id })}>{c.tag}</Link>
                  </th>
                  <td>
                    {c.species} · {c.resin}
                  </td>
                  <td className="tabular-nums">{f(c.actualWpgPct)}</td>
                  <td className="tabular-nums">{f(c.expectedWpgPct)}</td>
                  <td className="tabular-nums">{c.differencePct === null ? <span className="text-xs text-ink-soft">{c.note}</span> : f(c.differencePct, 0)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      {r.basis.length > 0 && (
        <p className="mt-2 text-xs text-ink-soft">
          Expected = the shop's fitted fraction of voids filled for the species and resin (from its other runs) × each coupon's theoretical maximum:{' '}
          {r.basis
            .map(
              (b) =>
                `${b.species} · ${b.resin} ${(b.fillFraction * 100).toFixed(0)} % (95 % CI ${(b.ci95[0] * 100).toFixed(0)}–${(b.ci95[1] * 100).toFixed(0)} %, ${b.nHistory} coupons)`,
            )
            .join('; ')}
          .
        </p>
      )}
    </section>
  );
}
