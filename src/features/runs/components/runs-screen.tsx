import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { RUN_STAGES } from '../../../../shared/constants/records';
import { RUN_STATUSES, STAGE_LABELS } from '../../../../shared/runs/stages';
import { RUN_SORTS, type RunListQuery } from '../../../../shared/schemas/runs';
import { ExportLink, FilterSelect, Pager, SearchBox, SortHeader } from '../../../components/ui/list-tools';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { queryOf, useListParams } from '../../../lib/list-params';
import { useRole } from '../../../lib/session';
import { runListQuery } from '../../../lib/queries/records';
import { useNow } from '../hooks/use-now';
import { CheckCounts, currentStageText } from './bench-screen';
import { DueTime, dateTime } from './time-text';
import { paths } from '../../../config/paths';

type StatusFilter = NonNullable<RunListQuery['status']>;
const STATUS_OPTIONS: { value: StatusFilter; label: string }[] = [
  { value: 'open', label: 'Open (cure not ended)' },
  ...RUN_STATUSES.map((s) => ({ value: s, label: s === 'in-progress' ? 'In progress' : s === 'planned' ? 'Planned' : 'Finished' })),
];
const STATUSES: readonly StatusFilter[] = STATUS_OPTIONS.map((o) => o.value);
const PAGE_SIZE = 50;
const oneOf = <T extends string>(list: readonly T[], v: string): T | undefined => list.find((x) => x === v);

/** The run list's sort, search and filters as the address holds them. */
export function runFiltersOf(get: (key: string) => string): Omit<RunListQuery, 'page' | 'pageSize'> {
  const sort = get('sort');
  return {
    sort: sort && RUN_SORTS.includes(sort.replace(/^-/, '') as (typeof RUN_SORTS)[number]) ? sort : undefined,
    q: get('q') || undefined,
    status: oneOf(STATUSES, get('status')),
    stage: oneOf(RUN_STAGES, get('stage')),
  };
}

export function RunsScreen() {
  const { can } = useRole();
  const list = useListParams();
  const filters = runFiltersOf(list.get);
  const runs = useQuery(runListQuery({ ...filters, page: list.page, pageSize: PAGE_SIZE }));
  const now = useNow();
  const sort = filters.sort ?? '-id';
  const filtered = Boolean(filters.q || filters.status || filters.stage);
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
      <div className="no-print mb-2 grid gap-x-4 sm:grid-cols-3" role="search" aria-label="Filter the runs">
        <SearchBox label="Search by code or chamber" value={filters.q ?? ''} onSearch={(q) => list.set({ q })} className="mb-3" />
        <FilterSelect
          className="mb-3"
          label="Status"
          any="All runs"
          value={filters.status}
          onChange={(v) => list.set({ status: v })}
          options={STATUS_OPTIONS}
        />
        <FilterSelect
          className="mb-3"
          label="Latest stage"
          any="Any stage"
          value={filters.stage}
          onChange={(v) => list.set({ stage: v })}
          options={RUN_STAGES.map((s) => ({ value: s, label: STAGE_LABELS[s] }))}
        />
      </div>
      <div className="mb-2 flex justify-end">
        <ExportLink href={`/api/runs/export.csv${queryOf(filters)}`} what="runs" />
      </div>
      {runs.isPending ? (
        <Loading />
      ) : runs.isError ? (
        <ErrorNote error={runs.error} />
      ) : runs.data.items.length === 0 ? (
        <p className="text-ink-soft">No runs {filtered ? 'match these filters' : 'yet'}.</p>
      ) : (
        <>
          <div className="overflow-x-auto">
            <table className="data-table">
              <caption className="sr-only">Runs matching the filters</caption>
              <thead>
                <tr>
                  <SortHeader label="Run" field="code" sort={sort} onSort={(v) => list.set({ sort: v })} />
                  <SortHeader label="Chamber" field="chamber" sort={sort} onSort={(v) => list.set({ sort: v })} />
                  <th scope="col">Resin lot</th>
                  <th scope="col">Coupons</th>
                  <th scope="col">Stage</th>
                  <th scope="col">Next due</th>
                  <th scope="col">Checks</th>
                  <SortHeader label="Created" field="createdAt" sort={sort} onSort={(v) => list.set({ sort: v })} />
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
                    <td className="whitespace-nowrap text-xs">{dateTime(r.createdAt)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <Pager page={list.page} pageSize={runs.data.pageSize} total={runs.data.total} onPage={list.setPage} what="runs" />
        </>
      )}
    </Page>
  );
}
