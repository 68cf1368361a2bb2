import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { TRIAL_STATUSES } from '../../../../shared/constants/records';
import { TRIAL_SORTS, type TrialListQuery, type TrialSummary } from '../../../../shared/schemas/trials';
import { ExportLink, FilterSelect, Pager, SearchBox, SortHeader } from '../../../components/ui/list-tools';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { queryOf, useListParams } from '../../../lib/list-params';
import { useRole } from '../../../lib/session';
import { trialListQuery } from '../../../lib/queries/records';
import { TRIAL_STATUS_LABELS } from './labels';
import { ProgressBar } from './progress-bar';
import { paths } from '../../../config/paths';
import { formatDate } from '../../../lib/format/dates';

const PAGE_SIZE = 25;

function gridSize(t: TrialSummary): string {
  return `${t.speciesCount} species × ${t.resinCount} resin${t.resinCount === 1 ? '' : 's'}`;
}

/** The trial list's sort, search and filter as the address holds them. */
export function trialFiltersOf(get: (key: string) => string): Omit<TrialListQuery, 'page' | 'pageSize'> {
  const sort = get('sort');
  return {
    sort: sort && TRIAL_SORTS.includes(sort.replace(/^-/, '') as (typeof TRIAL_SORTS)[number]) ? sort : undefined,
    q: get('q') || undefined,
    status: TRIAL_STATUSES.find((x) => x === get('status')),
  };
}

export function TrialsScreen() {
  const { can } = useRole();
  const list = useListParams();
  const filters = trialFiltersOf(list.get);
  const trials = useQuery(trialListQuery({ ...filters, page: list.page, pageSize: PAGE_SIZE }));
  const sort = filters.sort ?? '-createdAt';
  const header = (label: string, field: (typeof TRIAL_SORTS)[number], className?: string) => (
    <SortHeader label={label} field={field} sort={sort} onSort={(v) => list.set({ sort: v })} className={className} />
  );

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
      <div className="no-print mb-2 grid gap-x-4 sm:grid-cols-3" role="search" aria-label="Filter the trials">
        <SearchBox label="Search by code, title or question" value={filters.q ?? ''} onSearch={(q) => list.set({ q })} className="mb-3" />
        <FilterSelect
          className="mb-3"
          label="Status"
          any="Any status"
          value={filters.status}
          onChange={(v) => list.set({ status: v })}
          options={TRIAL_STATUSES.map((st) => ({ value: st, label: TRIAL_STATUS_LABELS[st] }))}
        />
      </div>
      <div className="mb-2 flex justify-end">
        <ExportLink href={`/api/trials/export.csv${queryOf(filters)}`} what="trials" />
      </div>
      {trials.isPending ? (
        <Loading />
      ) : trials.isError ? (
        <ErrorNote error={trials.error} />
      ) : trials.data.items.length === 0 ? (
        <p className="text-ink-soft">{filters.q || filters.status ? 'No trial matches.' : 'No trials yet.'}</p>
      ) : (
        <>
          <div className="overflow-x-auto">
            <table className="data-table">
              <caption className="sr-only">Trials matching the filters</caption>
              <thead>
                <tr>
                  {header('Code', 'code')}
                  {header('Title', 'title')}
                  {header('Status', 'status')}
                  <th scope="col">Grid</th>
                  <th scope="col">Coupons</th>
                  <th scope="col">Progress</th>
                  {header('Created', 'createdAt')}
                </tr>
              </thead>
              <tbody>
                {trials.data.items.map((t) => (
                  <tr key={t.id}>
                    <th scope="row" className="border-b border-paper-edge text-left font-normal text-ink whitespace-nowrap">
                      <Link to={paths.trial.href({ id: t.id })}>{t.code}</Link>
                    </th>
                    <td>{t.title}</td>
                    <td>{TRIAL_STATUS_LABELS[t.status]}</td>
                    <td className="whitespace-nowrap">{gridSize(t)}</td>
                    <td className="tabular-nums">
                      <Link to={paths.coupons.href({ trialId: t.id })} aria-label={`${t.couponCount} of ${t.plannedCount} planned coupons, their list`}>
                        {`${t.couponCount} of ${t.plannedCount}`}
                      </Link>
                    </td>
                    <td>
                      <ProgressBar done={t.doneCount} planned={t.plannedCount} />
                    </td>
                    <td className="whitespace-nowrap text-xs">{formatDate(t.createdAt)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <Pager page={list.page} pageSize={trials.data.pageSize} total={trials.data.total} onPage={list.setPage} what="trials" />
        </>
      )}
    </Page>
  );
}
