import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Link } from 'react-router-dom';
import type { WeighingStage } from '../../../../shared/constants/records';
import type { BenchItem, RunSummary } from '../../../../shared/schemas/runs';
import { STAGE_LABELS } from '../../../../shared/runs/stages';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { useRole } from '../../../lib/session';
import { benchQuery, runsInProgressQuery } from '../api/runs-queries';
import { useNow } from '../hooks/use-now';
import { StatusWord } from './rule-checks';
import { DueTime } from './time-text';
import { paths } from '../../../config/paths';

const WINDOWS = [2, 4, 8, 24] as const;

const WEIGHING_WORDS: Record<WeighingStage, string> = {
  dry: 'dry',
  soaked: 'soaked',
  cured: 'cured',
  'wet-test': 'water-soak test',
  'drying-check': 'drying-check',
};

/** Where one click takes the user for an item: the run's stage form, the run's grid at the coupon, or the coupon's weighing form. */
export function benchHref(item: BenchItem): string {
  if (item.target.entity === 'run') return paths.run.href({ id: item.target.id }, { stage: item.target.stage }, `stage-${item.target.stage}`);
  const stage = item.target.stage;
  if (stage === 'dry' || stage === 'soaked' || stage === 'cured') return paths.runCoupons.href({ id: item.runId }, { focus: item.target.id, col: stage });
  return paths.coupon.href({ id: item.target.id }, { weigh: stage }, 'weighing-form');
}

// The server sends one item per run and job: a run of 30 coupons waiting for their cured weighing is
// one job at the bench, not 30; it names the first coupons and counts them all.
function ItemRow({ item, now }: { item: BenchItem; now: Date }) {
  const many = item.couponCount > 1;
  let action: string;
  if (item.couponId === null) {
    action = item.kind === 'soak-minimum' ? 'Go to the soak' : `Record the end of ${STAGE_LABELS[item.stage ?? 'vacuum'].toLowerCase()}`;
  } else if (item.kind === 'drying-check-due') {
    action = many ? `Weigh ${item.couponTag} first` : `Weigh ${item.couponTag}`;
  } else {
    action = `Enter ${WEIGHING_WORDS[item.weighingStage ?? 'dry']} weights`;
  }
  const more = item.couponCount - item.coupons.length;
  return (
    <li className="py-3">
      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
        <p className="font-medium">{item.message}</p>
        <p className="text-sm">{item.dueAt ? <DueTime dueAt={item.dueAt} now={now} /> : <span className="text-ink-soft">due now</span>}</p>
      </div>
      <p className="mt-1 text-sm">
        <Link to={benchHref(item)}>{action}</Link>
        {' · '}
        <Link to={paths.run.href({ id: item.runId })}>run {item.runCode}</Link>
      </p>
      {many && (
        <details className="mt-1 text-sm">
          <summary className="cursor-pointer text-ink-soft">The {item.couponCount} coupons</summary>
          <ul className="mt-1 flex flex-wrap gap-x-3 gap-y-1">
            {item.coupons.map((c) => (
              <li key={c.id}>
                <Link to={benchHref({ ...item, target: { ...item.target, id: c.id } })}>{c.tag}</Link>
              </li>
            ))}
            {more > 0 && <li className="text-ink-soft">and {more} more</li>}
          </ul>
        </details>
      )}
    </li>
  );
}

function ItemList({ items, now, empty }: { items: BenchItem[]; now: Date; empty: string }) {
  if (items.length === 0) return <p className="py-2 text-ink-soft">{empty}</p>;
  return (
    <ul className="divide-y divide-paper-edge">
      {items.map((i) => (
        <ItemRow key={`${i.kind}:${i.runId}:${i.stage ?? ''}:${i.weighingStage ?? ''}`} item={i} now={now} />
      ))}
    </ul>
  );
}

function RunsInProgress({ now }: { now: Date }) {
  const { can } = useRole();
  const runs = useQuery(runsInProgressQuery());
  if (runs.isPending) return <Loading />;
  if (runs.isError) return <ErrorNote error={runs.error} />;
  if (runs.data.items.length === 0) {
    return (
      <p className="text-ink-soft">
        No run is in the chamber or the oven.
        {can('technician') && (
          <>
            {' '}
            <Link to={paths.runNew.href()}>Start a run</Link>.
          </>
        )}
      </p>
    );
  }
  return (
    <table className="data-table">
      <thead>
        <tr>
          <th scope="col">Run</th>
          <th scope="col">Now</th>
          <th scope="col">Next due</th>
          <th scope="col">Checks</th>
        </tr>
      </thead>
      <tbody>
        {runs.data.items.map((r) => (
          <tr key={r.id}>
            <th scope="row" className="border-b border-paper-edge font-normal">
              <Link to={paths.run.href({ id: r.id })}>{r.code}</Link> <span className="text-ink-faint">· {r.chamber}</span>
            </th>
            <td>{currentStageText(r)}</td>
            <td>
              {r.nextDue ? (
                <>
                  <DueTime dueAt={r.nextDue.dueAt} now={now} />
                  <br />
                  <span className="text-xs text-ink-soft">{r.nextDue.message}</span>
                </>
              ) : (
                <span className="text-ink-soft">nothing timed</span>
              )}
            </td>
            <td>
              <CheckCounts counts={r.checkCounts} />
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

export function currentStageText(r: Pick<RunSummary, 'progress'>): string {
  const p = r.progress;
  if (p.current === null) return 'not started';
  const label = STAGE_LABELS[p.current];
  if (p.status === 'finished') return 'finished';
  return p.currentOpen ? `${label}, in progress` : `${label} ended; next stage not started`;
}

export function CheckCounts({ counts }: { counts: RunSummary['checkCounts'] }) {
  const parts = (['fail', 'warn', 'pending', 'ok'] as const).filter((s) => counts[s] > 0);
  if (parts.length === 0) return <span className="text-ink-soft">none</span>;
  return (
    <span className="flex flex-wrap gap-1">
      {parts.map((s) => (
        <span key={s} className="whitespace-nowrap">
          {counts[s]} <StatusWord status={s} />
        </span>
      ))}
    </span>
  );
}

export function BenchScreen() {
  const [withinHours, setWithinHours] = useState<number>(4);
  const bench = useQuery(benchQuery(withinHours));
  const now = useNow();
  const items = bench.data?.items ?? [];
  const dueNow = items.filter((i) => i.dueAt === null || i.overdue || Date.parse(i.dueAt) <= now.getTime());
  const soon = items.filter((i) => !dueNow.includes(i));
  return (
    <Page title="Bench">
      <div className="grid gap-6 lg:grid-cols-2">
        <section aria-labelledby="due-now-heading" className="sheet p-3 sm:p-5">
          <h2 id="due-now-heading">Due now</h2>
          {bench.isPending ? (
            <Loading />
          ) : bench.isError ? (
            <ErrorNote error={bench.error} />
          ) : (
            <ItemList items={dueNow} now={now} empty="Nothing is waiting right now." />
          )}
        </section>
        <section aria-labelledby="soon-heading" className="sheet p-3 sm:p-5">
          <div className="flex flex-wrap items-baseline justify-between gap-2">
            <h2 id="soon-heading">Coming up</h2>
            <label className="text-sm text-ink-soft">
              within{' '}
              <select
                className="rounded border border-rule bg-white/70 px-2 py-0.5"
                value={withinHours}
                onChange={(e) => setWithinHours(Number(e.target.value))}
              >
                {WINDOWS.map((h) => (
                  <option key={h} value={h}>
                    {h} h
                  </option>
                ))}
              </select>
            </label>
          </div>
          {bench.isPending ? <Loading /> : bench.isError ? null : <ItemList items={soon} now={now} empty={`Nothing falls due in the next ${withinHours} h.`} />}
        </section>
      </div>
      <section aria-labelledby="in-progress-heading" className="sheet mt-6 p-3 sm:p-5">
        <h2 id="in-progress-heading" className="mb-2">
          Runs in progress
        </h2>
        <RunsInProgress now={now} />
      </section>
    </Page>
  );
}
