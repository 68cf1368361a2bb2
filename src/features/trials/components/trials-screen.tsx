import { useQuery } from '@tanstack/react-query';
import { useDeferredValue, useState } from 'react';
import { Link } from 'react-router-dom';
import { TRIAL_STATUSES, type TrialStatus } from '../../../../shared/constants/records';
import type { TrialSummary } from '../../../../shared/schemas/trials';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { useRole } from '../../../lib/session';
import { trialListQuery } from '../../../lib/queries/records';
import { TRIAL_STATUS_LABELS } from './labels';
import { ProgressBar } from './progress-bar';
import { paths } from '../../../config/paths';

const PAGE_SIZE = 25;

function gridSize(t: TrialSummary): string {
  return `${t.speciesCount} species × ${t.resinCount} resin${t.resinCount === 1 ? '' : 's'}`;
}

export function TrialsScreen() {
  const { can } = useRole();
  const [q, setQ] = useState('');
  const [status, setStatus] = useState<TrialStatus | ''>('');
  const [page, setPage] = useState(1);
  const deferredQ = useDeferredValue(q.trim());
  const list = useQuery(trialListQuery({ q: deferredQ || undefined, status: status || undefined, page, pageSize: PAGE_SIZE }));
  const pages = list.data ? Math.max(1, Math.ceil(list.data.total / PAGE_SIZE)) : 1;

  return (
    <Page
      title="Trials"
      actions={
        can('technician') ? (
          <Link to={paths.trialNew.href()} className="btn-primary no-underline">
            Plan a trial
          </Link>
        ) : undefined
      }
    >
      <div className="mb-4 flex flex-wrap items-end gap-4">
        <div>
          <label htmlFor="trial-search" className="field-label">
            Search by code, title or question
          </label>
          <input
            id="trial-search"
            type="search"
            className="field-input"
            value={q}
            onChange={(e) => {
              setQ(e.target.value);
              setPage(1);
            }}
          />
        </div>
        <div>
          <label htmlFor="trial-status" className="field-label">
            Status
          </label>
          <select
            id="trial-status"
            className="field-input"
            value={status}
            onChange={(e) => {
              setStatus(e.target.value as TrialStatus | '');
              setPage(1);
            }}
          >
            <option value="">Any status</option>
            {TRIAL_STATUSES.map((s) => (
              <option key={s} value={s}>
                {TRIAL_STATUS_LABELS[s]}
              </option>
            ))}
          </select>
        </div>
      </div>
      {list.isPending ? (
        <Loading />
      ) : list.isError ? (
        <ErrorNote error={list.error} />
      ) : list.data.items.length === 0 ? (
        <p className="text-ink-soft">{deferredQ || status ? 'No trial matches.' : 'No trials yet.'}</p>
      ) : (
        <>
          <div className="overflow-x-auto">
            <table className="data-table">
              <caption className="sr-only">Trials, newest first</caption>
              <thead>
                <tr>
                  <th scope="col">Code</th>
                  <th scope="col">Title</th>
                  <th scope="col">Status</th>
                  <th scope="col">Grid</th>
                  <th scope="col">Coupons</th>
                  <th scope="col">Progress</th>
                </tr>
              </thead>
              <tbody>
                {list.data.items.map((t) => {
                  return (
                    <tr key={t.id}>
                      <th scope="row" className="border-b border-paper-edge text-left font-normal text-ink whitespace-nowrap">
                        <Link to={paths.trial.href({ id: t.id })}>{t.code}</Link>
                      </th>
                      <td>{t.title}</td>
                      <td>{TRIAL_STATUS_LABELS[t.status]}</td>
                      <td className="whitespace-nowrap">{gridSize(t)}</td>
                      <td className="tabular-nums">{`${t.couponCount} of ${t.plannedCount}`}</td>
                      <td>
                        <ProgressBar done={t.doneCount} planned={t.plannedCount} />
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
          <nav aria-label="Pages of trials" className="mt-3 flex items-center gap-3 text-sm">
            <button type="button" className="btn-quiet" disabled={page <= 1} onClick={() => setPage((p) => p - 1)}>
              Previous page
            </button>
            <span role="status">
              Page {page} of {pages} · {list.data.total} trial{list.data.total === 1 ? '' : 's'}
            </span>
            <button type="button" className="btn-quiet" disabled={page >= pages} onClick={() => setPage((p) => p + 1)}>
              Next page
            </button>
          </nav>
        </>
      )}
    </Page>
  );
}
