import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery } from '@tanstack/react-query';
import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { useNavigate } from 'react-router-dom';
import { createRunSchema, type CreateRunInput } from '../../../../shared/schemas/runs';
import type { ResinLot } from '../../../../shared/schemas/reference';
import { Field, FormError } from '../../../components/ui/field';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { applyServerErrors } from '../../../lib/form-errors';
import { lotListQuery } from '../../../lib/queries/reference';
import { trialCouponsQuery, trialListQuery } from '../../../lib/queries/records';
import { useCreateRun } from '../api/use-create-run';
import { paths } from '../../../config/paths';

const FIELDS = ['code', 'chamber', 'resinLotId', 'altitudeM', 'notes', 'couponIds'] as const;
const blankToUndefined = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);
const numberOrUndefined = (v: unknown) => (v === '' || v === null || v === undefined ? undefined : Number(v));

/** The plain words on a lot's age, beside the pick: past its shelf life, close to it, or not active. */
export function lotWarning(lot: Pick<ResinLot, 'expired' | 'expiringSoon' | 'expiresOn' | 'ageDays' | 'shelfLifeDays' | 'status'>): string | null {
  if (lot.expired)
    return `Warning: this lot is past its ${lot.shelfLifeDays}-day shelf life (${lot.ageDays} days old, expired ${lot.expiresOn}). Resin past its shelf life may not cure fully.`;
  if (lot.expiringSoon) return `Warning: this lot reaches its ${lot.shelfLifeDays}-day shelf life on ${lot.expiresOn} (${lot.ageDays} days old).`;
  if (lot.status !== 'active') return `Warning: this lot is marked ${lot.status}.`;
  return null;
}

export function NewRunScreen() {
  const navigate = useNavigate();
  const create = useCreateRun();
  const lots = useQuery(lotListQuery());
  const trials = useQuery(trialListQuery());
  const [trialId, setTrialId] = useState<number | null>(null);
  const [picked, setPicked] = useState<Set<number>>(new Set());
  const form = useForm<CreateRunInput>({
    resolver: zodResolver(createRunSchema),
    defaultValues: { chamber: '', notes: null, resinLotId: null, couponIds: [] },
  });
  const { errors } = form.formState;
  const lotId = form.watch('resinLotId');
  const lot = lots.data?.items.find((l) => l.id === lotId);
  const warning = lot ? lotWarning(lot) : null;

  const togglePicked = (ids: number[], on: boolean) => {
    const next = new Set(picked);
    for (const id of ids)
      if (on) next.add(id);
      else next.delete(id);
    setPicked(next);
    form.setValue('couponIds', [...next]);
  };

  const onSubmit = form.handleSubmit(async (values) => {
    try {
      const run = await create.mutateAsync({ ...values, couponIds: [...picked] });
      navigate(paths.run.href({ id: run.id }));
    } catch (err) {
      applyServerErrors(err, form.setError, FIELDS);
    }
  });

  return (
    <Page title="New run">
      <form onSubmit={onSubmit} noValidate className="sheet max-w-3xl p-5" aria-label="New run">
        <FormError message={errors.root?.message} />
        <div className="grid gap-x-6 sm:grid-cols-2">
          <Field
            label="Chamber"
            registration={form.register('chamber')}
            error={errors.chamber?.message}
            hint="The chamber or pot this cycle runs in, as the shop names it."
          />
          <Field
            label="Run code (optional)"
            registration={form.register('code', { setValueAs: blankToUndefined })}
            error={errors.code?.message}
            hint="Left empty, the next code of the year is given."
          />
        </div>
        <div className="mb-4">
          <label htmlFor="run-lot" className="field-label">
            Resin lot
          </label>
          <select
            id="run-lot"
            className="field-input"
            aria-invalid={errors.resinLotId ? true : undefined}
            aria-describedby={[warning ? 'run-lot-warning' : '', errors.resinLotId ? 'run-lot-error' : ''].filter(Boolean).join(' ') || undefined}
            {...form.register('resinLotId', { setValueAs: (v) => (v === '' || v === null ? null : Number(v)) })}
            disabled={lots.isPending}
          >
            <option value="">No lot yet</option>
            {lots.data?.items.map((l) => (
              <option key={l.id} value={l.id}>
                {l.code} · {l.resinName} · activated {l.activatedAt.slice(0, 10)}
                {l.expired ? ' (past shelf life)' : l.expiringSoon ? ' (expires soon)' : ''}
                {l.status !== 'active' ? ` (${l.status})` : ''}
              </option>
            ))}
          </select>
          {lots.isError && <ErrorNote error={lots.error} />}
          {warning && (
            <p id="run-lot-warning" className="mt-1 rounded border border-amber-ink px-2 py-1 text-sm text-amber-ink">
              {warning}
            </p>
          )}
          {lot && lot.speciesThroughLot.length > 0 && (
            <p className="mt-1 text-xs text-ink-soft">
              Species already through this lot: {lot.speciesThroughLot.join(', ')}. Dark, tannin-rich woods can stain a lot that later serves pale woods.
            </p>
          )}
          {errors.resinLotId && (
            <p id="run-lot-error" role="alert" className="mt-1 text-sm text-margin">
              {errors.resinLotId.message}
            </p>
          )}
        </div>
        <Field
          label="Shop altitude for this run, m (optional)"
          type="number"
          step="1"
          registration={form.register('altitudeM', { setValueAs: numberOrUndefined })}
          error={errors.altitudeM?.message}
          hint="Left empty, the shop setting is used. It fixes the air pressure the gauge readings are subtracted from."
        />
        <div className="mb-4">
          <label htmlFor="run-notes" className="field-label">
            Notes (optional)
          </label>
          <textarea
            id="run-notes"
            rows={2}
            className="field-input"
            {...form.register('notes', { setValueAs: (v) => (typeof v === 'string' && v.trim() === '' ? null : v) })}
          />
        </div>

        <fieldset className="mb-4 rounded border border-rule p-3">
          <legend className="px-1 text-sm font-medium text-ink-soft">Coupons to include</legend>
          <label htmlFor="run-trial" className="field-label">
            From trial
          </label>
          <select id="run-trial" className="field-input" value={trialId ?? ''} onChange={(e) => setTrialId(e.target.value ? Number(e.target.value) : null)}>
            <option value="">Pick a trial</option>
            {trials.data?.items.map((t) => (
              <option key={t.id} value={t.id}>
                {t.code} · {t.title} ({t.couponCount} coupons)
              </option>
            ))}
          </select>
          {trials.isError && <ErrorNote error={trials.error} />}
          {trialId !== null && <TrialCoupons trialId={trialId} picked={picked} onToggle={togglePicked} />}
          <p className="mt-2 text-sm" role="status">
            {picked.size} coupon{picked.size === 1 ? '' : 's'} picked.
          </p>
          {errors.couponIds && (
            <p role="alert" className="mt-1 text-sm text-margin">
              {errors.couponIds.message}
            </p>
          )}
        </fieldset>
        <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
          Create the run
        </button>
      </form>
    </Page>
  );
}

function TrialCoupons({ trialId, picked, onToggle }: { trialId: number; picked: Set<number>; onToggle: (ids: number[], on: boolean) => void }) {
  const coupons = useQuery(trialCouponsQuery(trialId));
  const rows = useMemo(() => coupons.data?.items ?? [], [coupons.data]);
  if (coupons.isPending) return <Loading label="Loading the trial's coupons…" />;
  if (coupons.isError) return <ErrorNote error={coupons.error} />;
  if (rows.length === 0)
    return <p className="mt-2 text-sm text-ink-soft">This trial has no coupons yet; create its planned coupons on the trial's page first.</p>;
  // Controls stay untreated and a coupon goes through one run only, so those cannot be picked.
  const available = rows.filter((c) => c.role === 'treated' && c.runId === null);
  const allOn = available.length > 0 && available.every((c) => picked.has(c.id));
  return (
    <div className="mt-3">
      <button
        type="button"
        className="btn-quiet mb-2"
        disabled={available.length === 0}
        onClick={() =>
          onToggle(
            available.map((c) => c.id),
            !allOn,
          )
        }
      >
        {allOn ? 'Unpick all' : `Pick all ${available.length} free treated coupons`}
      </button>
      <ul className="grid max-h-80 gap-1 overflow-auto sm:grid-cols-2">
        {rows.map((c) => {
          const why = c.role === 'control' ? 'control, stays untreated' : c.runId !== null ? `in run ${c.runCode ?? c.runId}` : null;
          const id = `pick-${c.id}`;
          return (
            <li key={c.id} className="flex items-center gap-2 text-sm">
              <input id={id} type="checkbox" disabled={why !== null} checked={picked.has(c.id)} onChange={(e) => onToggle([c.id], e.target.checked)} />
              <label htmlFor={id} className={why ? 'text-ink-faint' : ''}>
                {c.tag} · {c.speciesName}
                {why ? ` (${why})` : ''}
              </label>
            </li>
          );
        })}
      </ul>
      {coupons.data.total > rows.length && (
        <p className="mt-1 text-xs text-ink-faint">
          Showing the first {rows.length} of {coupons.data.total} coupons.
        </p>
      )}
    </div>
  );
}
