import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Link } from 'react-router-dom';
import { RUN_STATUSES } from '../../../../shared/runs/stages';
import type { RunListQuery } from '../../../../shared/schemas/runs';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { useRole } from '../../../lib/session';
import { runListQuery } from '../../../lib/queries/records';
import { useNow } from '../hooks/use-now';
import { CheckCounts, currentStageText } from './bench-screen';
import { DueTime, dateTime } from './time-text';
import { paths } from '../../../config/paths';

type StatusFilter = NonNullable<RunListQuery['status']> | '';
const STATUS_OPTIONS: { value: StatusFilter; label: string }[] = [
  { value: '', label: 'All runs' },
  { value: 'open', label: 'Open (cure not ended)' },
  ...RUN_STATUSES.map((s) => ({ value: s, label: s === 'in-progress' ? 'In progress' : s === 'planned' ? 'Planned' : 'Finished' })),
];

export function RunsScreen() {
  const { can } = useRole();
  const [status, setStatus] = useState<StatusFilter>('');
  const [page, setPage] = useState(1);
  const runs = useQuery(runListQuery({ status: status || undefined, page, pageSize: 50 }));
  const now = useNow();
  return (
    <Page
      title="Runs"
      actions={
        can('technician') ? (
          <Link to={paths.runNew.href()} className="btn-primary no-underline">
            New run
          </Link>
        ) : undefined
      }
    >
      <div className="mb-4">
        <label htmlFor="run-status" className="field-label">
          Show
        </label>
        <select
          id="run-status"
          className="field-input max-w-xs"
          value={status}
          onChange={(e) => {
            setStatus(e.target.value as StatusFilter);
            setPage(1);
          }}
        >
          {STATUS_OPTIONS.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
      </div>
      {runs.isPending ? (
        <Loading />
      ) : runs.isError ? (
        <ErrorNote error={runs.error} />
      ) : runs.data.items.length === 0 ? (
        <p className="text-ink-soft">No runs {status ? 'match this filter' : 'yet'}.</p>
      ) : (
        <>
          <table className="data-table">
            <caption className="sr-only">Runs, newest first</caption>
            <thead>
              <tr>
                <th scope="col">Run</th>
                <th scope="col">Chamber</th>
                <th scope="col">Resin lot</th>
                <th scope="col">Coupons</th>
                <th scope="col">Stage</th>
                <th scope="col">Next due</th>
                <th scope="col">Checks</th>
              </tr>
            </thead>
            <tbody>
              {runs.data.items.map((r) => (
                <tr key={r.id}>
                  <th scope="row" className="border-b border-paper-edge font-normal">
                    <Link to={paths.run.href({ id: r.id })}>{r.code}</Link>
                    {r.startedAt && <div className="text-xs text-ink-faint">started {dateTime(r.startedAt)}</div>}
                  </th>
                  <td>{r.chamber}</td>
                  <td>{r.lotCode ? `${r.lotCode} (${r.resinName ?? 'resin'})` : <span className="text-ink-soft">none</span>}</td>
                  <td>
                    <Link to={paths.runCoupons.href({ id: r.id })} aria-label={`${r.couponCount} coupons of run ${r.code}, open the entry grid`}>
                      {r.couponCount}
                    </Link>
                  </td>
                  <td>{currentStageText(r)}</td>
                  <td>{r.nextDue ? <DueTime dueAt={r.nextDue.dueAt} now={now} /> : <span className="text-ink-soft">—</span>}</td>
                  <td>
                    <CheckCounts counts={r.checkCounts} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          <Pager page={page} pageSize={runs.data.pageSize} total={runs.data.total} onPage={setPage} />
        </>
      )}
    </Page>
  );
}

export function Pager({ page, pageSize, total, onPage }: { page: number; pageSize: number; total: number; onPage: (p: number) => void }) {
  const pages = Math.max(1, Math.ceil(total / pageSize));
  if (pages === 1) return <p className="mt-2 text-sm text-ink-faint">{total} in all.</p>;
  return (
    <nav aria-label="Pages" className="mt-3 flex items-center gap-3 text-sm">
      <button type="button" className="btn-quiet" disabled={page <= 1} onClick={() => onPage(page - 1)}>
        Previous
      </button>
      <span>
        Page {page} of {pages} ({total} in all)
      </span>
      <button type="button" className="btn-quiet" disabled={page >= pages} onClick={() => onPage(page + 1)}>
        Next
      </button>
    </nav>
  );
}
