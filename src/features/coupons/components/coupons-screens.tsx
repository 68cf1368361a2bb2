import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useCallback, useId, useState } from 'react';
import { Link, useNavigate, useParams, useSearchParams } from 'react-router-dom';
import { COUPON_ROLES } from '../../../../shared/constants/records';
import { COUPON_SORTS, COUPON_WAITING_FOR, type CouponListQuery, type CouponWaitingFor } from '../../../../shared/schemas/coupons';
import { ExportLink, FilterSelect, Pager, SearchBox, SortHeader } from '../../../components/ui/list-tools';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { queryOf, useListParams } from '../../../lib/list-params';
import { couponListQuery, trialQuery } from '../../../lib/queries/records';
import { runOptionsQuery, speciesOptionsQuery, trialOptionsQuery } from '../../../lib/queries/options';
import { useUnits } from '../../../lib/use-units';
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

/** The entry grid of one trial's coupons. */
export function TrialCouponsScreen() {
  const trialId = Number(useParams().id);
  const [search] = useSearchParams();
  const valid = Number.isInteger(trialId) && trialId > 0;
  const trial = useQuery({ ...trialQuery(trialId), enabled: valid });
  const code = trial.data?.code ?? null;
  if (!valid)
    return (
      <Page title="Coupons">
        <ErrorNote error={new Error('There is no trial at this address.')} />
      </Page>
    );
  return (
    <Page
      title={code ? `Coupons of trial ${code}` : 'Coupons of the trial'}
      actions={
        <>
          <Link to={paths.trial.href({ id: trialId })} className="btn-quiet no-underline">
            Back to the trial
          </Link>
          <Link to={paths.coupons.href({ trialId })} className="btn-quiet no-underline">
            As a list
          </Link>
        </>
      }
    >
      <ScopedGrid scope={{ trialId }} caption={`Measurements of the coupons of trial ${code ?? trialId}`} focus={focusFrom(search)} />
    </Page>
  );
}

export const WAITING_FOR_LABELS: Record<CouponWaitingFor, string> = {
  'dry-weighing': 'a dry weight',
  'soaked-weighing': 'a soaked weight',
  'cured-weighing': 'a cured weight',
  'dry-dimensions': 'dry dimensions',
};
const ROLE_LABELS = { treated: 'treated', control: 'control (untreated)' } as const;
const PAGE_SIZE = 50;
type CouponSort = (typeof COUPON_SORTS)[number];
const isCouponSort = (s: string): boolean => COUPON_SORTS.includes(s.replace(/^-/, '') as CouponSort);
const oneOf = <T extends string>(list: readonly T[], v: string): T | undefined => list.find((x) => x === v);

/** The list's filters as the address holds them, in the contract's terms. */
export function couponFiltersOf(
  get: (key: string) => string,
  getId: (key: string) => number | undefined,
): Omit<CouponListQuery, 'page' | 'pageSize' | 'after'> {
  const sort = get('sort');
  return {
    sort: sort && isCouponSort(sort) ? sort : 'tag',
    q: get('q') || undefined,
    trialId: getId('trialId'),
    conditionId: getId('conditionId'),
    runId: getId('runId'),
    speciesId: getId('speciesId'),
    role: oneOf(COUPON_ROLES, get('role')),
    waitingFor: oneOf(COUPON_WAITING_FOR, get('waitingFor')),
  };
}

/** The coupon list: sort, search by tag, filters and export, all kept in the address; and a box to open a coupon by its tag. */
export function CouponsScreen() {
  const list = useListParams();
  const filters = couponFiltersOf(list.get, list.getId);
  const trials = useQuery(trialOptionsQuery());
  const runs = useQuery(runOptionsQuery());
  const species = useQuery(speciesOptionsQuery());
  const trial = useQuery({ ...trialQuery(filters.trialId ?? 0), enabled: filters.trialId !== undefined });
  const { set } = list;
  const onSearch = useCallback((q: string) => set({ q }), [set]);
  const title = trial.data ? `Coupons of trial ${trial.data.code}` : 'Coupons';
  return (
    <Page
      title={title}
      actions={
        filters.trialId ? (
          <Link to={paths.trialCoupons.href({ id: filters.trialId })} className="btn-primary no-underline">
            Enter measurements in the trial's grid
          </Link>
        ) : filters.runId ? (
          <Link to={paths.runCoupons.href({ id: filters.runId })} className="btn-primary no-underline">
            Enter measurements in the run's grid
          </Link>
        ) : undefined
      }
    >
      <OpenByTag />
      <div className="no-print mb-4 grid gap-x-4 sm:grid-cols-2 lg:grid-cols-4" role="search" aria-label="Filter the coupons">
        <SearchBox label="Search by tag" value={filters.q ?? ''} onSearch={onSearch} className="mb-3" />
        <FilterSelect
          className="mb-3"
          label="Trial"
          any="Any trial"
          value={filters.trialId}
          onChange={(v) => set({ trialId: v, conditionId: null })}
          options={(trials.data ?? []).map((t) => ({ value: t.id, label: t.label }))}
        />
        {filters.trialId !== undefined && (
          <FilterSelect
            className="mb-3"
            label="Condition"
            any="Any condition"
            value={filters.conditionId}
            onChange={(v) => set({ conditionId: v })}
            options={(trial.data?.conditions ?? []).map((c) => ({ value: c.id, label: c.label }))}
          />
        )}
        <FilterSelect
          className="mb-3"
          label="Run"
          any="Any run"
          value={filters.runId}
          onChange={(v) => set({ runId: v })}
          options={(runs.data ?? []).map((r) => ({ value: r.id, label: r.label }))}
        />
        <FilterSelect
          className="mb-3"
          label="Species"
          any="Any species"
          value={filters.speciesId}
          onChange={(v) => set({ speciesId: v })}
          options={(species.data ?? []).map((sp) => ({ value: sp.id, label: sp.label }))}
        />
        <FilterSelect
          className="mb-3"
          label="Role"
          any="Treated and controls"
          value={filters.role}
          onChange={(v) => set({ role: v })}
          options={COUPON_ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }))}
        />
        <FilterSelect
          className="mb-3"
          label="Waiting for"
          any="Anything or nothing"
          value={filters.waitingFor}
          onChange={(v) => set({ waitingFor: v })}
          options={COUPON_WAITING_FOR.map((w) => ({ value: w, label: `waiting for ${WAITING_FOR_LABELS[w]}` }))}
        />
      </div>
      <CouponList filters={filters} page={list.page} onPage={list.setPage} onSort={(sort) => set({ sort: sort === 'tag' ? null : sort })} />
    </Page>
  );
}

/**
 * "Scan or type a tag": a label's QR code read by a scanner that types (its address ends in
 * /coupons/<id>) or a tag typed by hand, then Enter, opens the coupon.
 */
function OpenByTag() {
  const id = useId();
  const qc = useQueryClient();
  const navigate = useNavigate();
  const [text, setText] = useState('');
  const [note, setNote] = useState<string | null>(null);
  const open = async () => {
    const typed = text.trim();
    if (!typed) return;
    const fromAddress = /\/coupons\/(\d+)\/?(?:[?#].*)?$/.exec(typed);
    if (fromAddress) {
      navigate(paths.coupon.href({ id: Number(fromAddress[1]) }));
      return;
    }
    setNote(`Looking for ${typed}…`);
    try {
      const found = await qc.fetchQuery(couponListQuery({ q: typed, pageSize: 20, sort: 'tag' }));
      const exact = found.items.find((c) => c.tag.toLowerCase() === typed.toLowerCase());
      const only = found.items.length === 1 ? found.items[0] : undefined;
      const hit = exact ?? only;
      if (hit) navigate(paths.coupon.href({ id: hit.id }));
      else if (found.total === 0) setNote(`No coupon has a tag like ${typed}.`);
      else setNote(`${found.total} coupons have ${typed} in their tag; type the whole tag, or search the list below.`);
    } catch {
      setNote('The coupon could not be looked up; try again.');
    }
  };
  return (
    <form
      className="no-print sheet mb-4 flex flex-wrap items-end gap-3 p-3"
      aria-label="Open a coupon by its tag"
      onSubmit={(e) => {
        e.preventDefault();
        void open();
      }}
    >
      <div className="min-w-0 flex-1">
        <label htmlFor={id} className="field-label">
          Scan or type a tag
        </label>
        <input
          id={id}
          className="field-input"
          autoComplete="off"
          spellCheck={false}
          value={text}
          aria-describedby={`${id}-note`}
          onChange={(e) => {
            setText(e.target.value);
            setNote(null);
          }}
        />
      </div>
      <button type="submit" className="btn-primary mb-0.5">
        Open the coupon
      </button>
      <p id={`${id}-note`} role="status" className="basis-full text-sm text-ink-soft">
        {note}
      </p>
    </form>
  );
}

function CouponList({
  filters,
  page,
  onPage,
  onSort,
}: {
  filters: ReturnType<typeof couponFiltersOf>;
  page: number;
  onPage: (p: number) => void;
  onSort: (sort: string) => void;
}) {
  const units = useUnits();
  // "Next page" follows the cursor the server gave with this page (keyset), so a page far down a shop's
  // 100,000 coupons costs what the first one does; a page reached by its number alone (a link, or
  // "Previous" before the pages walked) is read by offset. The cursors belong to one filter and sort.
  const scope = JSON.stringify(filters);
  const [cursors, setCursors] = useState<{ scope: string; at: Record<number, string> }>({ scope, at: {} });
  const known = cursors.scope === scope ? cursors.at : {};
  const after = known[page];
  const list = useQuery(couponListQuery({ ...filters, page, pageSize: PAGE_SIZE, ...(after ? { after } : {}) }));
  const goTo = (p: number) => {
    const next = list.data?.nextCursor;
    if (p === page + 1 && next) setCursors({ scope, at: { ...known, [p]: next } });
    onPage(p);
  };
  const sort = filters.sort ?? 'tag';
  const header = (label: string, field: CouponSort, className?: string) => (
    <SortHeader label={label} field={field} sort={sort} onSort={onSort} className={className} />
  );
  const filtered = Object.entries(filters).some(([k, v]) => k !== 'sort' && v !== undefined);
  return (
    <>
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <p className="text-sm text-ink-soft">Click a column's name to sort by it. Tags open the coupon; the trial and run filters lead to their grids.</p>
        <ExportLink href={`/api/coupons/export.csv${queryOf(filters)}`} what="coupons" />
      </div>
      {list.isPending ? (
        <Loading />
      ) : list.isError ? (
        <ErrorNote error={list.error} />
      ) : list.data.items.length === 0 ? (
        <p className="text-ink-soft">{filtered ? 'No coupon matches these filters.' : 'No coupons yet.'}</p>
      ) : (
        <>
          <div className="overflow-x-auto">
            {/* Busy while the previous page stays on screen and the new sort or filter loads (keepPreviousData). */}
            <table className="data-table" aria-busy={list.isPlaceholderData || undefined}>
              <caption className="sr-only">Coupons matching the filters</caption>
              <thead>
                <tr>
                  {header('Tag', 'tag')}
                  <th scope="col">Species</th>
                  <th scope="col">Condition</th>
                  <th scope="col">Role</th>
                  <th scope="col">Trial</th>
                  <th scope="col">Run</th>
                  {header('Dry SG', 'drySg', 'text-right')}
                  {header('WPG (%)', 'wpgPct', 'text-right')}
                  {header(`Resin loading (${units.label('density')})`, 'resinLoadingKgM3', 'text-right')}
                </tr>
              </thead>
              <tbody>
                {list.data.items.map((c) => (
                  <tr key={c.id}>
                    <th scope="row" className="border-b border-paper-edge font-normal whitespace-nowrap">
                      <Link to={paths.coupon.href({ id: c.id })}>{c.tag}</Link>
                    </th>
                    <td>{c.speciesName}</td>
                    <td title={c.condition?.label}>
                      {c.condition ? (
                        `${c.condition.plannedResin.name} · ${c.condition.processLabel}`
                      ) : (
                        <span className="text-ink-soft">{c.role === 'control' ? 'untreated' : '—'}</span>
                      )}
                    </td>
                    <td>{c.role}</td>
                    <td>{c.trialId ? <Link to={paths.trial.href({ id: c.trialId })}>{c.trialCode ?? c.trialId}</Link> : '—'}</td>
                    <td>{c.runId ? <Link to={paths.run.href({ id: c.runId })}>{c.runCode ?? c.runId}</Link> : '—'}</td>
                    <td className="text-right tabular-nums">{c.drySg === null ? '—' : c.drySg.toFixed(3)}</td>
                    <td className="text-right tabular-nums">{c.wpgPct === null ? '—' : c.wpgPct.toFixed(1)}</td>
                    <td className="text-right tabular-nums">{units.format(c.resinLoadingKgM3, 'density', false)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <Pager page={page} pageSize={list.data.pageSize} total={list.data.total} onPage={goTo} what="coupons" />
        </>
      )}
    </>
  );
}
