import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Link, useParams, useSearchParams } from 'react-router-dom';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { couponListQuery } from '../../../lib/queries/records';
import { runOptionsQuery, trialOptionsQuery } from '../../../lib/queries/options';
import { gridCouponsQuery, type GridScope } from '../api/coupons-queries';
import { EntryGrid } from './entry-grid';
import { columnIndexOf } from './grid-model';
import { paths } from '../../../config/paths';

function focusFrom(search: URLSearchParams): { couponId: number; col: number } | null {
  const couponId = Number(search.get('focus'));
  if (!Number.isInteger(couponId) || couponId <= 0) return null;
  return { couponId, col: columnIndexOf(search.get('col')) };
}

function ScopedGrid({ scope, caption, focus }: { scope: GridScope; caption: string; focus: { couponId: number; col: number } | null }) {
  const coupons = useQuery(gridCouponsQuery(scope));
  if (coupons.isPending) return <Loading label="Loading the coupons…" />;
  if (coupons.isError) return <ErrorNote error={coupons.error} />;
  if (coupons.data.length === 0) return <p className="text-ink-soft">No coupons here yet.</p>;
  return <EntryGrid coupons={coupons.data} scope={scope} caption={caption} focus={focus} />;
}

/** The entry grid of one run's coupons. */
export function RunCouponsScreen() {
  const params = useParams();
  const runId = Number(params.id);
  const [search] = useSearchParams();
  const coupons = useQuery({ ...gridCouponsQuery({ runId }), enabled: Number.isInteger(runId) && runId > 0 });
  const code = coupons.data?.[0]?.runCode ?? null;
  const title = code ? `Coupons of run ${code}` : 'Coupons of the run';
  if (!Number.isInteger(runId) || runId <= 0)
    return (
      <Page title="Coupons">
        <ErrorNote error={new Error('There is no run at this address.')} />
      </Page>
    );
  return (
    <Page
      title={title}
      actions={
        <Link to={paths.run.href({ id: runId })} className="btn-quiet no-underline">
          Back to the run
        </Link>
      }
    >
      <ScopedGrid scope={{ runId }} caption={`Measurements of the coupons in run ${code ?? runId}`} focus={focusFrom(search)} />
    </Page>
  );
}

/** The coupon list, or the entry grid of one trial's or one run's coupons when one is picked. */
export function CouponsScreen() {
  const [search, setSearch] = useSearchParams();
  const trialId = Number(search.get('trialId')) || null;
  const runId = Number(search.get('runId')) || null;
  const trials = useQuery(trialOptionsQuery());
  const runs = useQuery(runOptionsQuery());
  const pick = (key: 'trialId' | 'runId', value: string) => {
    const next = new URLSearchParams();
    if (value) next.set(key, value);
    setSearch(next);
  };
  const trial = trials.data?.find((t) => t.id === trialId);
  const run = runs.data?.find((r) => r.id === runId);
  const scope: GridScope | null = trialId ? { trialId } : runId ? { runId } : null;
  const caption = trialId ? `Measurements of the coupons of trial ${trial?.code ?? trialId}` : `Measurements of the coupons in run ${run?.code ?? runId}`;
  return (
    <Page title={trial ? `Coupons of trial ${trial.code}` : run ? `Coupons of run ${run.code}` : 'Coupons'}>
      <div className="no-print mb-4 flex flex-wrap gap-4">
        <div>
          <label htmlFor="coupons-trial" className="field-label">
            Trial
          </label>
          <select id="coupons-trial" className="field-input" value={trialId ?? ''} onChange={(e) => pick('trialId', e.target.value)}>
            <option value="">Any trial</option>
            {trials.data?.map((t) => (
              <option key={t.id} value={t.id}>
                {t.label}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="coupons-run" className="field-label">
            Run
          </label>
          <select id="coupons-run" className="field-input" value={runId ?? ''} onChange={(e) => pick('runId', e.target.value)}>
            <option value="">Any run</option>
            {runs.data?.map((r) => (
              <option key={r.id} value={r.id}>
                {r.label}
              </option>
            ))}
          </select>
        </div>
      </div>
      {scope ? <ScopedGrid key={JSON.stringify(scope)} scope={scope} caption={caption} focus={focusFrom(search)} /> : <CouponList />}
    </Page>
  );
}

function CouponList() {
  const [page, setPage] = useState(1);
  const list = useQuery(couponListQuery({ page, pageSize: 50, sort: 'tag' }));
  if (list.isPending) return <Loading />;
  if (list.isError) return <ErrorNote error={list.error} />;
  const pages = Math.max(1, Math.ceil(list.data.total / list.data.pageSize));
  return (
    <>
      <p className="mb-2 text-sm text-ink-soft">Pick a trial or a run above to enter measurements in a grid.</p>
      <table className="data-table">
        <caption className="sr-only">All coupons by tag</caption>
        <thead>
          <tr>
            <th scope="col">Tag</th>
            <th scope="col">Species</th>
            <th scope="col">Role</th>
            <th scope="col">Trial</th>
            <th scope="col">Run</th>
            <th scope="col" className="text-right">
              WPG (%)
            </th>
          </tr>
        </thead>
        <tbody>
          {list.data.items.map((c) => (
            <tr key={c.id}>
              <th scope="row" className="border-b border-paper-edge font-normal">
                <Link to={paths.coupon.href({ id: c.id })}>{c.tag}</Link>
              </th>
              <td>{c.speciesName}</td>
              <td>{c.role}</td>
              <td>{c.trialId ? <Link to={paths.coupons.href({ trialId: c.trialId })}>{c.trialCode ?? c.trialId}</Link> : '—'}</td>
              <td>{c.runId ? <Link to={paths.run.href({ id: c.runId })}>{c.runCode ?? c.runId}</Link> : '—'}</td>
              <td className="text-right tabular-nums">{c.metrics.wpgPct === null ? '—' : c.metrics.wpgPct.toFixed(1)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {pages > 1 && (
        <nav aria-label="Pages" className="mt-3 flex items-center gap-3 text-sm">
          <button type="button" className="btn-quiet" disabled={page <= 1} onClick={() => setPage(page - 1)}>
            Previous
          </button>
          <span>
            Page {page} of {pages} ({list.data.total} coupons)
          </span>
          <button type="button" className="btn-quiet" disabled={page >= pages} onClick={() => setPage(page + 1)}>
            Next
          </button>
        </nav>
      )}
    </>
  );
}
