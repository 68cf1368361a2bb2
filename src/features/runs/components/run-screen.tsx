import { useQuery } from '@tanstack/react-query';
import { useEffect, useMemo, useRef, useState } from 'react';
import { Link, useLocation, useParams, useSearchParams } from 'react-router-dom';
import { RUN_STAGES, type CouponRole, type RunStage, type WeighingStage } from '../../../../shared/constants/records';
import type { RunDetail, RunStageOut } from '../../../../shared/schemas/runs';
import { STAGE_LABELS, stageMinutes, type StageTimes } from '../../../../shared/runs/stages';
import { formatTemperatureRange } from '../../../../shared/runs/format';
import { DEFAULT_CURE_WINDOW_C } from '../../../../shared/runs/thresholds';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { useRole } from '../../../lib/session';
import { useUnits } from '../../../lib/use-units';
import { couponFullListQuery, couponListQuery, runQuery } from '../../../lib/queries/records';
import { lotResinWarnings, vacuumStartWarning, weighingWarnings, type EntryWarning } from '../../../../shared/runs/contradictions';
import type { CouponOut } from '../../../../shared/schemas/coupons';
import { EntryWarnings } from '../../../components/ui/entry-warnings';
import { useNow } from '../hooks/use-now';
import { RunExpected } from './run-expected';
import { RunPhotos } from './run-photos';
import { CautionNote } from './caution-note';
import { RuleChecks } from './rule-checks';
import { CorrectStageForm } from './correct-stage-form';
import { RunHistoryPanel } from './run-history';
import { RunDetailsForm } from './run-details-form';
import { gaugeNote, StageForm } from './stage-form';
import { DueTime, dateTime, formatSpan } from './time-text';
import { paths } from '../../../config/paths';

type StageState = 'done' | 'in progress' | 'not started' | 'skipped';

function stateOf(run: RunDetail, stage: RunStage): StageState {
  const rec = run.stages.find((s) => s.stage === stage);
  if (rec) return rec.endedAt === null ? 'in progress' : 'done';
  const later = RUN_STAGES.slice(RUN_STAGES.indexOf(stage) + 1).some((s) => run.stages.some((r) => r.stage === s));
  return later ? 'skipped' : 'not started';
}

const STATE_MARK: Record<StageState, string> = {
  done: 'border-moss bg-moss text-paper',
  'in progress': 'border-amber-ink bg-amber text-ink',
  'not started': 'border-rule bg-paper text-ink-faint',
  skipped: 'border-rule bg-paper-deep text-ink-faint',
};

function Minutes({ minutes }: { minutes: number }) {
  return <>{formatSpan(minutes * 60_000)}</>;
}

function StageFacts({ s, run, now }: { s: RunStageOut; run: RunDetail; now: Date }) {
  const units = useUnits();
  const took = stageMinutes(s);
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-0.5 text-sm">
      <dt className="text-ink-soft">Started</dt>
      <dd>{dateTime(s.startedAt)}</dd>
      <dt className="text-ink-soft">Ended</dt>
      <dd>
        {s.endedAt ? (
          `${dateTime(s.endedAt)} (took ${formatSpan((took ?? 0) * 60_000)})`
        ) : (
          <>not yet, running for {formatSpan(now.getTime() - Date.parse(s.startedAt))}</>
        )}
      </dd>
      <dt className="text-ink-soft">Planned length</dt>
      <dd>
        {s.plannedMinutes != null ? <Minutes minutes={s.plannedMinutes} /> : 'not planned'}
        {s.plannedEndAt && s.endedAt === null && (
          <>
            {' '}
            · ends <DueTime dueAt={s.plannedEndAt} now={now} />
          </>
        )}
      </dd>
      {s.stage === 'vacuum' && (
        <>
          <dt className="text-ink-soft">Bubbling stopped</dt>
          <dd>{s.bubblingStoppedAt ? dateTime(s.bubblingStoppedAt) : 'not recorded'}</dd>
        </>
      )}
      {(s.stage === 'cure' || s.stage === 'drying') && (
        <>
          <dt className="text-ink-soft">Oven set point</dt>
          <dd>{units.format(s.ovenSetC, 'temperature')}</dd>
          <dt className="text-ink-soft">Thermometer in the oven</dt>
          <dd>{units.format(s.ovenMeasuredC, 'temperature')}</dd>
        </>
      )}
      {s.notes && (
        <>
          <dt className="text-ink-soft">Notes</dt>
          <dd className="whitespace-pre-line">{s.notes}</dd>
        </>
      )}
      {s.stage === 'vacuum' && s.readings.length > 0 && (
        <>
          <dt className="sr-only">Gauge readings</dt>
          <dd className="col-span-2 mt-2">
            <table className="data-table">
              <caption className="text-left text-sm font-medium text-ink-soft">
                Gauge readings at {units.format(run.altitudeM, 'altitude')}, against{' '}
                {s.ambientSource === 'barometer'
                  ? `the shop's barometer, ${units.format(s.ambientKpa, 'pressure')}`
                  : `the standard atmosphere there, ${units.format(s.ambientKpa, 'pressure')}`}
              </caption>
              <thead>
                <tr>
                  <th scope="col">Time</th>
                  <th scope="col">Gauge showed</th>
                  <th scope="col">Absolute pressure</th>
                  <th scope="col">% vacuum</th>
                </tr>
              </thead>
              <tbody>
                {s.readings.map((r) => (
                  <tr key={r.id}>
                    <td>{dateTime(r.at)}</td>
                    {/* As the gauge showed it, in the unit printed on the gauge; the next columns are in the user's units. */}
                    <td data-units-as-entered="">
                      {r.gaugeValue} {r.gaugeUnit}
                    </td>
                    <td>{units.format(r.absoluteKpa, 'pressure')}</td>
                    <td>{r.percentVacuum.toFixed(1)} %</td>
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="mt-1 text-xs text-ink-faint">{gaugeNote(units)}</p>
          </dd>
        </>
      )}
    </dl>
  );
}

/**
 * What the run's records contradict, read the same way the forms warn at entry: the lot's resin against
 * the plan of its coupons, weighings dated ahead of the run's stages, and coupons still without a dry
 * weight while the vacuum has not started (after it has, the missing uptake shows on each coupon).
 */
export interface RunForWarnings {
  code: string;
  lot: { code: string; resin: { id: number; name: string } } | null;
  stages: readonly StageTimes[];
  coupons: readonly { id: number; tag: string; role: CouponRole; stagesWeighed: readonly WeighingStage[] }[];
}

/** A coupon of the run with its plan and its current weighings. */
export type RunCouponForWarnings = Pick<CouponOut, 'id' | 'tag' | 'role' | 'condition'> & {
  weighings: readonly { stage: WeighingStage; measuredAt: string }[];
};

export function runContradictions(run: RunForWarnings, coupons: readonly RunCouponForWarnings[]): EntryWarning[] {
  const lot = run.lot
    ? lotResinWarnings(
        { code: run.lot.code, resin: run.lot.resin },
        coupons.map((c) => ({ id: c.id, tag: c.tag, role: c.role, plannedResin: c.condition?.plannedResin ?? null })),
      )
    : [];
  const runOf = { code: run.code, stages: run.stages };
  const weighings = weighingWarnings(
    coupons.flatMap((c) => c.weighings.map((w) => ({ couponId: c.id, tag: c.tag, role: c.role, stage: w.stage, measuredAt: w.measuredAt, run: runOf }))),
  );
  const vacuumStarted = run.stages.some((s) => s.stage === 'vacuum');
  const dry = vacuumStarted
    ? null
    : vacuumStartWarning(run.coupons.map((c) => ({ id: c.id, tag: c.tag, role: c.role, hasDryWeighing: c.stagesWeighed.includes('dry') })));
  return [...lot, ...weighings, ...(dry ? [dry] : [])];
}

/** The trial condition a coupon of the run was made for (from the run's coupon list, read once for all rows). */
function ConditionOf({ runId, couponId }: { runId: number; couponId: number }) {
  const coupons = useQuery(couponListQuery({ runId, pageSize: 200, sort: 'tag' }));
  const c = coupons.data?.items.find((x) => x.id === couponId);
  if (!c?.condition) return null;
  return (
    <span className="block text-xs text-ink-soft">
      {c.condition.plannedResin.name} · {c.condition.processLabel}
    </span>
  );
}

function RunContradictions({ run }: { run: RunDetail }) {
  const coupons = useQuery({ ...couponFullListQuery({ runId: run.id, pageSize: 200, sort: 'tag' }), enabled: run.coupons.length > 0 });
  const items = coupons.data?.items;
  const warnings = useMemo(() => runContradictions(run, items ?? []), [run, items]);
  if (warnings.length === 0) return null;
  return (
    <section aria-label="Contradictions in this run's records" className="mb-6">
      <EntryWarnings warnings={warnings} />
    </section>
  );
}

function Timeline({ run, now, focusStage }: { run: RunDetail; now: Date; focusStage: RunStage | null }) {
  const { can } = useRole();
  const mayWrite = can('technician');
  const [opened, setOpened] = useState<RunStage | null>(focusStage && run.startableStages.includes(focusStage) ? focusStage : null);
  const [correcting, setCorrecting] = useState<RunStage | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const noticeRef = useRef<HTMLParagraphElement>(null);
  const saved = (message: string) => {
    setOpened(null);
    setCorrecting(null);
    setNotice(message);
    requestAnimationFrame(() => noticeRef.current?.focus());
  };
  return (
    <>
      <p ref={noticeRef} tabIndex={-1} role="status" className="mb-2 text-sm text-moss">
        {notice}
      </p>
      <ol className="relative space-y-4 border-l-2 border-rule pl-6">
        {RUN_STAGES.map((stage) => {
          const rec = run.stages.find((s) => s.stage === stage);
          const state = stateOf(run, stage);
          const startable = run.startableStages.includes(stage);
          return (
            <li key={stage} id={`stage-${stage}`} tabIndex={-1} className="relative scroll-mt-4">
              <span className={`absolute -left-[2.15rem] top-0.5 inline-block h-4 w-4 rounded-full border-2 ${STATE_MARK[state]}`} aria-hidden="true" />
              <h3 className="font-semibold">
                {STAGE_LABELS[stage]} <span className="text-sm font-normal text-ink-soft">— {state}</span>
              </h3>
              {rec && <StageFacts s={rec} run={run} now={now} />}
              {rec && mayWrite && correcting !== stage && (
                <button type="button" className="btn-quiet mt-1 min-h-6 px-2 py-0.5 text-xs" onClick={() => setCorrecting(stage)}>
                  Correct<span className="sr-only"> the {STAGE_LABELS[stage].toLowerCase()} stage</span>…
                </button>
              )}
              {rec && correcting === stage && <CorrectStageForm run={run} stage={rec} onDone={saved} onCancel={() => setCorrecting(null)} />}
              {(stage === 'vacuum' || stage === 'cure') && (state === 'in progress' || startable) && <CautionNote cautions={run.cautions[stage] ?? []} />}
              {rec && rec.endedAt === null && mayWrite && <StageForm run={run} stage={stage} mode="open" existing={rec} onSaved={saved} />}
              {!rec && startable && mayWrite && (
                <>
                  {opened === stage ? (
                    <StageForm run={run} stage={stage} mode="start" onSaved={saved} />
                  ) : (
                    <button type="button" className="btn-quiet mt-1" onClick={() => setOpened(stage)}>
                      Start {STAGE_LABELS[stage].toLowerCase()}…
                    </button>
                  )}
                </>
              )}
              {!rec && state === 'not started' && !startable && <p className="text-sm text-ink-faint">Waits for the stages before it.</p>}
            </li>
          );
        })}
      </ol>
    </>
  );
}

export function RunScreen() {
  const params = useParams();
  const id = Number(params.id);
  const run = useQuery({ ...runQuery(id), enabled: Number.isInteger(id) && id > 0, refetchInterval: 60_000 });
  const units = useUnits();
  const [search] = useSearchParams();
  const location = useLocation();
  const now = useNow();
  const focus = search.get('stage');
  const focusStage = RUN_STAGES.find((s) => s === focus) ?? null;
  const { can } = useRole();
  const [editing, setEditing] = useState(false);
  const [detailsNotice, setDetailsNotice] = useState<string | null>(null);

  const loadedId = run.data?.id;
  useEffect(() => {
    if (loadedId === undefined || !location.hash) return;
    const el = document.getElementById(location.hash.slice(1));
    if (el) {
      el.scrollIntoView({ block: 'start' });
      el.focus({ preventScroll: true });
    }
  }, [loadedId, location.hash]);

  if (!Number.isInteger(id) || id <= 0)
    return (
      <Page title="Run">
        <ErrorNote error={new Error('There is no run at this address.')} />
      </Page>
    );
  if (run.isPending)
    return (
      <Page title="Run">
        <Loading />
      </Page>
    );
  if (run.isError)
    return (
      <Page title="Run">
        <ErrorNote error={run.error} />
      </Page>
    );
  const r = run.data;
  return (
    <Page
      title={`Run ${r.code}`}
      actions={
        <>
          {can('technician') && !editing && (
            <button
              type="button"
              className="btn-quiet"
              onClick={() => {
                setDetailsNotice(null);
                setEditing(true);
              }}
            >
              Change details…
            </button>
          )}
          <Link to={paths.compare.href({ runId: r.id })} className="btn-quiet no-underline">
            Results in Compare
          </Link>
          <Link to={paths.runCoupons.href({ id: r.id })} className="btn-primary no-underline">
            Coupons grid ({r.coupons.length})
          </Link>
        </>
      }
    >
      <p role="status" className="mb-2 text-sm text-moss">
        {detailsNotice}
      </p>
      {editing && (
        <RunDetailsForm
          run={r}
          onDone={(message) => {
            setEditing(false);
            setDetailsNotice(message);
          }}
          onCancel={() => setEditing(false)}
        />
      )}
      <dl className="mb-6 grid gap-x-6 gap-y-1 text-sm sm:grid-cols-[auto_1fr_auto_1fr]">
        <dt className="text-ink-soft">Chamber</dt>
        <dd>{r.chamber}</dd>
        <dt className="text-ink-soft">Resin lot</dt>
        <dd>{r.lot ? `${r.lot.code} · ${r.lot.resin.name} (activated ${r.lot.activatedAt.slice(0, 10)}, reused ${r.lot.reuseCount}×)` : 'none recorded'}</dd>
        <dt className="text-ink-soft">Altitude</dt>
        <dd>
          {units.format(r.altitudeM, 'altitude')}; air pressure there {units.format(r.ambientKpa, 'pressure')} (standard atmosphere)
        </dd>
        <dt className="text-ink-soft">Cure window</dt>
        <dd>
          {r.lot
            ? formatTemperatureRange(r.lot.resin.cureMinC, r.lot.resin.cureMaxC, units.prefs)
            : `${formatTemperatureRange(DEFAULT_CURE_WINDOW_C.min, DEFAULT_CURE_WINDOW_C.max, units.prefs)} (usual; no resin recorded)`}
        </dd>
        {r.notes && (
          <>
            <dt className="text-ink-soft">Notes</dt>
            <dd className="sm:col-span-3 whitespace-pre-line">{r.notes}</dd>
          </>
        )}
      </dl>

      <RunContradictions run={r} />
      <div className="grid gap-6 lg:grid-cols-[3fr_2fr]">
        <section aria-labelledby="timeline-heading" className="sheet p-3 sm:p-5" id="stage-forms">
          <h2 id="timeline-heading" className="mb-3">
            Stages
          </h2>
          <Timeline run={r} now={now} focusStage={focusStage} />
        </section>
        <div className="space-y-6">
          <section aria-labelledby="due-heading" className="sheet p-3 sm:p-5">
            <h2 id="due-heading" className="mb-2">
              Due next
            </h2>
            {r.due.items.length === 0 ? (
              <p className="text-ink-soft">
                {r.progress.status === 'finished' ? 'The run is finished.' : 'Nothing timed: give a stage its planned length to see when it is due.'}
              </p>
            ) : (
              <ul className="space-y-2">
                {r.due.items.map((d) => (
                  <li key={`${d.kind}-${d.stage}`}>
                    <DueTime dueAt={d.dueAt} now={now} />
                    <br />
                    <span className="text-sm">{d.message}</span>
                  </li>
                ))}
              </ul>
            )}
          </section>
          <section aria-labelledby="checks-heading" className="sheet p-3 sm:p-5">
            <h2 id="checks-heading" className="mb-2">
              Rule checks
            </h2>
            <RuleChecks checks={r.checks} />
          </section>
          <section aria-labelledby="coupons-heading" className="sheet p-3 sm:p-5">
            <h2 id="coupons-heading" className="mb-2">
              Coupons in this run
            </h2>
            {r.coupons.length === 0 ? (
              <p className="text-ink-soft">No coupons yet.</p>
            ) : (
              <table className="data-table">
                <thead>
                  <tr>
                    <th scope="col">Tag</th>
                    <th scope="col">Species and condition</th>
                    <th scope="col">Weighed</th>
                  </tr>
                </thead>
                <tbody>
                  {r.coupons.map((c) => (
                    <tr key={c.id}>
                      <th scope="row" className="border-b border-paper-edge font-normal">
                        <Link to={paths.coupon.href({ id: c.id })}>{c.tag}</Link>
                      </th>
                      <td>
                        {c.speciesName}
                        <ConditionOf runId={r.id} couponId={c.id} />
                      </td>
                      <td>{c.stagesWeighed.length ? c.stagesWeighed.join(', ') : <span className="text-ink-soft">nothing yet</span>}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </section>
          <RunPhotos run={r} />
        </div>
      </div>
      <RunExpected runId={r.id} />
      <RunHistoryPanel runId={r.id} />
    </Page>
  );
}
