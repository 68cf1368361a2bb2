import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { TRIAL_STATUSES, type TrialStatus } from '../../../../shared/constants/records';
import type { Progress, Trial, TrialCondition } from '../../../../shared/schemas/trials';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { useRole } from '../../../lib/session';
import { useUnits } from '../../../lib/use-units';
import { trialQuery } from '../../../lib/queries/records';
import { useCreatePlannedCoupons } from '../api/use-create-planned-coupons';
import { useUpdateTrial } from '../api/use-update-trial';
import { TRIAL_STATUS_LABELS } from './labels';
import { PlanningWarnings } from './planning-warnings';
import { controlDone, ProgressBar, treatedDone } from './progress-bar';
import { paths } from '../../../config/paths';

export function TrialScreen() {
  const id = Number(useParams().id);
  const trial = useQuery({ ...trialQuery(id), enabled: Number.isInteger(id) && id > 0 });
  if (trial.isPending) {
    return (
      <Page title="Trial">
        <Loading />
      </Page>
    );
  }
  if (trial.isError) {
    return (
      <Page title="Trial">
        <ErrorNote error={trial.error} />
      </Page>
    );
  }
  return <TrialView trial={trial.data} />;
}

function TrialView({ trial }: { trial: Trial }) {
  const { can } = useRole();
  const create = useCreatePlannedCoupons(trial.id);
  const missing = trial.totals.planned - trial.totals.created;

  // Once every planned coupon exists, creating them is no longer the next step: the button steps back
  // (quiet, last) and the grid, where the measurements go, comes first.
  const allMade = missing <= 0;
  const createButton = (
    <button
      type="button"
      className={allMade ? 'btn-quiet' : 'btn-primary'}
      title={allMade ? 'Every planned coupon exists; this adds only what a changed plan is missing' : undefined}
      onClick={() => create.mutate()}
      disabled={create.isPending}
    >
      Create the planned coupons
    </button>
  );

  return (
    <Page
      title={`${trial.code} · ${trial.title}`}
      actions={
        <>
          {can('technician') && !allMade && createButton}
          {trial.totals.created > 0 && (
            <Link to={paths.trialCoupons.href({ id: trial.id })} className={`${allMade ? 'btn-primary' : 'btn-quiet'} no-underline`}>
              Entry grid
            </Link>
          )}
          {can('technician') && trial.status !== 'closed' && (
            <Link to={paths.trialEdit.href({ id: trial.id })} className="btn-quiet no-underline">
              Edit the plan
            </Link>
          )}
          <Link to={paths.trialLabels.href({ id: trial.id })} className="btn-quiet no-underline">
            Label sheet
          </Link>
          <Link to={paths.compare.href({ trialId: trial.id })} className="btn-quiet no-underline">
            Results in Compare
          </Link>
          {can('technician') && allMade && createButton}
        </>
      }
    >
      <div className="mb-2 min-h-5 text-sm" role="status">
        {create.isPending && 'Creating the coupons…'}
        {create.data &&
          (create.data.created === 0
            ? 'Every planned coupon already exists; nothing was added.'
            : `Created ${create.data.created} coupon${create.data.created === 1 ? '' : 's'}, each with its tag. Print the label sheet to mark them.`)}
      </div>
      {create.isError && <ErrorNote error={create.error} />}

      <dl className="mb-6 grid max-w-4xl gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
        <dt className="font-semibold text-ink-soft">Question</dt>
        <dd>{trial.question}</dd>
        <dt className="font-semibold text-ink-soft">Status</dt>
        <dd>{can('technician') ? <StatusChanger trial={trial} /> : TRIAL_STATUS_LABELS[trial.status]}</dd>
        <dt className="font-semibold text-ink-soft">Controls per species</dt>
        <dd>{trial.controlsPerSpecies} untreated</dd>
        <dt className="font-semibold text-ink-soft">Coupons</dt>
        <dd>
          {trial.totals.created} of {trial.totals.planned} planned made
          {missing > 0 && `; ${missing} still to create`}
          {trial.totals.created > 0 && (
            <>
              {' · '}
              <Link to={paths.coupons.href({ trialId: trial.id })}>list of its coupons</Link>
              {' · '}
              <Link to={paths.trialCoupons.href({ id: trial.id })}>entry grid</Link>
            </>
          )}
        </dd>
        <dt className="font-semibold text-ink-soft">Runs</dt>
        <dd>
          {trial.runs.length === 0 ? (
            'none of its coupons is in a run yet'
          ) : (
            <ul className="flex flex-wrap gap-x-3">
              {trial.runs.map((r) => (
                <li key={r.id}>
                  <Link to={paths.run.href({ id: r.id })}>{r.code}</Link> ({r.couponCount} coupon{r.couponCount === 1 ? '' : 's'})
                </li>
              ))}
            </ul>
          )}
          {can('technician') && trial.totals.created > 0 && (
            <>
              {' '}
              <Link to={paths.runNew.href()}>new run</Link>
            </>
          )}
        </dd>
        {trial.notes && (
          <>
            <dt className="font-semibold text-ink-soft">Notes</dt>
            <dd className="whitespace-pre-line">{trial.notes}</dd>
          </>
        )}
      </dl>

      <PlanningWarnings warnings={trial.warnings} heading="What this plan may not be able to answer" />
      <ConditionsGrid trial={trial} />
      <ProgressTable trial={trial} />
    </Page>
  );
}

function StatusChanger({ trial }: { trial: Trial }) {
  const update = useUpdateTrial(trial.id);
  const [status, setStatus] = useState<TrialStatus>(trial.status);
  return (
    <div className="flex flex-wrap items-center gap-2">
      <label htmlFor="trial-status" className="sr-only">
        Status of the trial
      </label>
      <select
        id="trial-status"
        className="rounded border border-rule bg-white/70 px-2 py-1"
        value={status}
        onChange={(e) => setStatus(e.target.value as TrialStatus)}
      >
        {TRIAL_STATUSES.map((s) => (
          <option key={s} value={s}>
            {TRIAL_STATUS_LABELS[s]}
          </option>
        ))}
      </select>
      {status !== trial.status && (
        <button type="button" className="btn-quiet" disabled={update.isPending} onClick={() => update.mutate({ status })}>
          Set the status to {TRIAL_STATUS_LABELS[status]}
        </button>
      )}
      <span role="status" className="text-sm text-moss">
        {update.isSuccess && status === trial.status ? 'Status saved.' : ''}
      </span>
      {update.isError && <ErrorNote error={update.error} />}
    </div>
  );
}

/** Species down the side, resin and process settings across, coupons wanted in each cell. */
function ConditionsGrid({ trial }: { trial: Trial }) {
  const species = [...new Map(trial.conditions.map((c) => [c.speciesId, c.speciesName])).entries()];
  const columns = [...new Map(trial.conditions.map((c) => [`${c.resinId}:${c.processLabel}`, c])).values()];
  const cell = (speciesId: number, col: TrialCondition) =>
    trial.conditions.find((c) => c.speciesId === speciesId && c.resinId === col.resinId && c.processLabel === col.processLabel);
  const controls = new Map(trial.controls.map((c) => [c.speciesId, c.progress]));

  return (
    <section aria-labelledby="grid-heading" className="mb-8">
      <h2 id="grid-heading" className="mb-2">
        Conditions grid
      </h2>
      {trial.conditions.length === 0 ? (
        <p className="text-ink-soft">No conditions planned.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="data-table w-auto">
            <caption className="sr-only">Coupons planned per species, resin and process settings, and how many are made</caption>
            <thead>
              <tr>
                <th scope="col">Species</th>
                {columns.map((c) => (
                  <th scope="col" key={`${c.resinId}:${c.processLabel}`}>
                    {c.resinName}
                    <span className="block text-xs font-normal">{c.processLabel}</span>
                  </th>
                ))}
                <th scope="col">Untreated controls</th>
              </tr>
            </thead>
            <tbody>
              {species.map(([sid, name]) => (
                <tr key={sid}>
                  <th scope="row" className="border-b border-paper-edge text-left font-normal text-ink">
                    {name}
                  </th>
                  {columns.map((col) => {
                    const c = cell(sid, col);
                    return (
                      <td key={`${col.resinId}:${col.processLabel}`} className="tabular-nums">
                        {c ? <CellCounts progress={c.progress} /> : <span>not planned</span>}
                      </td>
                    );
                  })}
                  <td className="tabular-nums">
                    <CellCounts progress={controls.get(sid) ?? { planned: trial.controlsPerSpecies, created: 0, dryWeighed: 0, curedWeighed: 0 }} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}

function CellCounts({ progress }: { progress: Progress }) {
  return (
    <>
      {progress.planned} planned
      <span className="block text-xs text-ink-soft">{progress.created} made</span>
    </>
  );
}

function ProgressTable({ trial }: { trial: Trial }) {
  const units = useUnits();
  const minutes = (m: number | null) => (m === null ? null : m % 60 === 0 ? `${m / 60} h` : `${m} min`);
  const settings = (c: TrialCondition) =>
    [
      c.vacuumMinutes !== null && `vacuum ${minutes(c.vacuumMinutes)}`,
      c.soakMinutes !== null && `soak ${minutes(c.soakMinutes)}`,
      c.cureTempC !== null && `cure at ${units.format(c.cureTempC, 'temperature')}`,
      c.cureMinutes !== null && `for ${minutes(c.cureMinutes)}`,
      c.thicknessMm !== null && `${units.format(c.thicknessMm, 'length')} thick`,
    ]
      .filter(Boolean)
      .join(', ') || '—';

  const row = (key: string, label: string, detail: string, p: Progress, done: number) => (
    <tr key={key}>
      <th scope="row" className="border-b border-paper-edge text-left font-normal text-ink">
        {label}
      </th>
      <td className="text-xs">{detail}</td>
      <td className="tabular-nums">{p.planned}</td>
      <td className="tabular-nums">{p.created}</td>
      <td className="tabular-nums">{p.dryWeighed}</td>
      <td className="tabular-nums">{p.curedWeighed}</td>
      <td>
        <ProgressBar done={done} planned={p.planned} />
      </td>
    </tr>
  );

  return (
    <section aria-labelledby="progress-heading">
      <h2 id="progress-heading" className="mb-2">
        Progress per condition
      </h2>
      <div className="overflow-x-auto">
        <table className="data-table">
          <caption className="sr-only">Coupons planned, made, weighed dry and weighed after cure, per condition</caption>
          <thead>
            <tr>
              <th scope="col">Condition</th>
              <th scope="col">Process settings</th>
              <th scope="col">Planned</th>
              <th scope="col">Created</th>
              <th scope="col">Dry-weighed</th>
              <th scope="col">Weighed after cure</th>
              <th scope="col">Done</th>
            </tr>
          </thead>
          <tbody>
            {trial.conditions.map((c) => row(`c${c.id}`, c.label, settings(c), c.progress, treatedDone(c.progress)))}
            {trial.controls.map((c) =>
              row(`k${c.speciesId}`, `${c.speciesName} · untreated controls`, 'no resin; done once weighed dry', c.progress, controlDone(c.progress)),
            )}
          </tbody>
          <tfoot>{row('total', 'Whole trial', '', trial.totals, trial.doneCount)}</tfoot>
        </table>
      </div>
    </section>
  );
}
