import { useQuery } from '@tanstack/react-query';
import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { useNavigate } from 'react-router-dom';
import { createRunSchema, type CreateRunInput } from '../../../../shared/schemas/runs';
import type { CouponListRow } from '../../../../shared/schemas/coupons';
import type { ResinLot } from '../../../../shared/schemas/reference';
import { lotResinWarnings, mixedConditionsWarning, type EntryWarning } from '../../../../shared/runs/contradictions';
import { AltitudeQuestion } from '../../../components/ui/altitude-question';
import { EntryWarnings, useGoOnAnyway } from '../../../components/ui/entry-warnings';
import { Field, FormError } from '../../../components/ui/field';
import { NumberField } from '../../../components/ui/number-field';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { applyServerErrors } from '../../../lib/form-errors';
import { renameFields } from '../../../lib/form-values';
import { toSi } from '../../../lib/forms/number-input';
import { convertingResolver } from '../../../lib/forms/resolver';
import { lotListQuery } from '../../../lib/queries/reference';
import { trialCouponsQuery, trialListQuery } from '../../../lib/queries/records';
import { useUnits } from '../../../lib/use-units';
import { useCreateRun } from '../api/use-create-run';
import { paths } from '../../../config/paths';
import { LotSelect } from './lot-select';

// A refused coupon (taken by another run meanwhile) has no box of its own; its message shows above the form.
const FIELDS = ['code', 'chamber', 'resinLotId', 'altitude', 'notes'] as const;
const RENAMES = { altitudeM: 'altitude' };

interface NewRunValues {
  code: string;
  chamber: string;
  resinLotId: string;
  /** In the user's altitude unit. */
  altitude: number | null;
  notes: string;
}

/** A picked coupon as the warnings need it: the coupon answer keeps its condition and its planned resin. */
type Picked = Pick<CouponListRow, 'id' | 'tag' | 'role' | 'condition'>;

/** What contradicts the records in the run as picked: the lot's resin against the plan, and mixed conditions. */
export function newRunWarnings(lot: Pick<ResinLot, 'code' | 'resinId' | 'resinName'> | undefined, picked: readonly Picked[]): EntryWarning[] {
  const out = lot
    ? lotResinWarnings(
        { code: lot.code, resin: { id: lot.resinId, name: lot.resinName } },
        picked.map((c) => ({ id: c.id, tag: c.tag, role: c.role, plannedResin: c.condition?.plannedResin ?? null })),
      )
    : [];
  const mixed = mixedConditionsWarning(picked);
  return mixed ? [mixed, ...out] : out;
}

export function NewRunScreen() {
  const navigate = useNavigate();
  const create = useCreateRun();
  const units = useUnits();
  const lots = useQuery(lotListQuery());
  const trials = useQuery(trialListQuery());
  const [trialId, setTrialId] = useState<number | null>(null);
  // The picked coupons themselves, not only their ids: the warnings need their conditions even after
  // the picker moves to another trial.
  const [picked, setPicked] = useState<Map<number, Picked>>(new Map());
  const resolver = useMemo(
    () =>
      convertingResolver<NewRunValues, typeof createRunSchema>(
        createRunSchema,
        (v) => ({
          code: v.code.trim() === '' ? undefined : v.code.trim(),
          chamber: v.chamber,
          resinLotId: v.resinLotId === '' ? null : Number(v.resinLotId),
          altitudeM: toSi(v.altitude, 'altitude', units) ?? undefined,
          notes: v.notes.trim() === '' ? null : v.notes,
        }),
        RENAMES,
      ),
    [units],
  );
  const form = useForm<NewRunValues, unknown, CreateRunInput>({
    resolver,
    defaultValues: { code: '', chamber: '', resinLotId: '', altitude: null, notes: '' },
  });
  const { errors } = form.formState;
  const altitude = form.watch('altitude');
  const lotId = Number(form.watch('resinLotId')) || null;
  const lot = lots.data?.items.find((l) => l.id === lotId);
  const pickedList = useMemo(() => [...picked.values()], [picked]);
  const contradictions = useMemo(() => newRunWarnings(lot, pickedList), [lot, pickedList]);
  const gate = useGoOnAnyway(contradictions);

  const togglePicked = (coupons: Picked[], on: boolean) => {
    const next = new Map(picked);
    for (const c of coupons)
      if (on) next.set(c.id, c);
      else next.delete(c.id);
    setPicked(next);
  };

  const onSubmit = form.handleSubmit(async (values) => {
    if (!gate.mayGoOn()) return;
    try {
      const run = await create.mutateAsync({ ...values, couponIds: [...picked.keys()] });
      navigate(paths.run.href({ id: run.id }));
    } catch (err) {
      applyServerErrors(renameFields(err, RENAMES), form.setError, FIELDS);
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
            registration={form.register('code')}
            error={errors.code?.message}
            hint="Left empty, the next code of the year is given."
          />
        </div>
        <LotSelect
          id="run-lot"
          lots={lots}
          registration={form.register('resinLotId')}
          pickedId={lotId}
          error={errors.resinLotId?.message}
          emptyLabel="No lot yet"
        />
        <NumberField
          form={form}
          name="altitude"
          label="Shop altitude for this run (optional)"
          quantity="altitude"
          hint="Left empty, the shop setting is used. It fixes the air pressure the gauge readings are subtracted from."
        />
        <AltitudeQuestion id="run-altitude-question" altitudeM={altitude == null || Number.isNaN(altitude) ? null : units.fromDisplay(altitude, 'altitude')} />
        <div className="mb-4">
          <label htmlFor="run-notes" className="field-label">
            Notes (optional)
          </label>
          <textarea id="run-notes" rows={2} className="field-input" {...form.register('notes')} />
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
            {picked.size} coupon{picked.size === 1 ? '' : 's'} picked
            {pickedConditionsText(pickedList)}.
          </p>
        </fieldset>
        <EntryWarnings warnings={contradictions} gate={gate} action="create the run" className="mb-4" />
        <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
          Create the run
        </button>
      </form>
    </Page>
  );
}

function pickedConditionsText(picked: readonly Picked[]): string {
  const labels = [...new Set(picked.filter((c) => c.condition).map((c) => c.condition?.label))];
  if (labels.length === 0) return '';
  return labels.length === 1 ? `, all of ${labels[0]}` : `, from ${labels.length} conditions`;
}

interface ConditionGroup {
  key: string;
  label: string;
  coupons: CouponListRow[];
}

/** The trial's coupons by condition, conditions in the trial's order, controls and unplanned coupons last. */
function groupByCondition(rows: readonly CouponListRow[]): ConditionGroup[] {
  const groups = new Map<string, ConditionGroup>();
  for (const c of rows) {
    const key = c.condition ? `c${c.condition.id}` : c.role === 'control' ? 'controls' : 'none';
    const label = c.condition ? c.condition.label : c.role === 'control' ? 'Untreated controls' : 'Without a condition';
    const g = groups.get(key) ?? { key, label, coupons: [] };
    g.coupons.push(c);
    groups.set(key, g);
  }
  const rank = (g: ConditionGroup) => (g.key === 'controls' ? 2 : g.key === 'none' ? 1 : 0);
  return [...groups.values()].sort((a, b) => rank(a) - rank(b) || (a.coupons[0]?.conditionId ?? 0) - (b.coupons[0]?.conditionId ?? 0));
}

function TrialCoupons({ trialId, picked, onToggle }: { trialId: number; picked: Map<number, Picked>; onToggle: (coupons: Picked[], on: boolean) => void }) {
  const coupons = useQuery(trialCouponsQuery(trialId));
  const groups = useMemo(() => groupByCondition(coupons.data?.items ?? []), [coupons.data]);
  if (coupons.isPending) return <Loading label="Loading the trial's coupons…" />;
  if (coupons.isError) return <ErrorNote error={coupons.error} />;
  if (groups.length === 0)
    return <p className="mt-2 text-sm text-ink-soft">This trial has no coupons yet; create its planned coupons on the trial's page first.</p>;
  return (
    <div className="mt-3 space-y-3">
      <p className="text-xs text-ink-faint">
        One run is one vacuum, soak and cure: pick the coupons of one condition. Controls stay untreated, and a coupon goes through one run only.
      </p>
      {groups.map((g) => {
        // Controls stay untreated and a coupon goes through one run only, so those cannot be picked.
        const available = g.coupons.filter((c) => c.role === 'treated' && c.runId === null);
        const allOn = available.length > 0 && available.every((c) => picked.has(c.id));
        return (
          <fieldset key={g.key} className="rounded border border-paper-edge p-2" data-condition={g.label}>
            <legend className="px-1 text-sm font-semibold">
              {g.label} <span className="font-normal text-ink-soft">({available.length} free)</span>
            </legend>
            {available.length > 0 && (
              <button type="button" className="btn-quiet mb-2" onClick={() => onToggle(available, !allOn)}>
                {allOn ? `Unpick the ${available.length} of this condition` : `Pick all ${available.length} free coupons of this condition`}
                <span className="sr-only"> ({g.label})</span>
              </button>
            )}
            <ul className="grid max-h-60 gap-1 overflow-auto sm:grid-cols-2">
              {g.coupons.map((c) => {
                const why = c.role === 'control' ? 'control, stays untreated' : c.runId !== null ? `in run ${c.runCode ?? c.runId}` : null;
                const id = `pick-${c.id}`;
                return (
                  <li key={c.id} className="flex min-h-6 items-center gap-2 text-sm">
                    <input
                      id={id}
                      type="checkbox"
                      className="h-4 w-4"
                      disabled={why !== null}
                      checked={picked.has(c.id)}
                      onChange={(e) => onToggle([c], e.target.checked)}
                    />
                    <label htmlFor={id} className={why ? 'text-ink-faint' : ''}>
                      {c.tag} · {c.speciesName}
                      {c.condition ? ` · ${c.condition.processLabel}` : ''}
                      {why ? ` (${why})` : ''}
                    </label>
                  </li>
                );
              })}
            </ul>
          </fieldset>
        );
      })}
      {coupons.data.total > coupons.data.items.length && (
        <p className="mt-1 text-xs text-ink-faint">
          Showing the first {coupons.data.items.length} of {coupons.data.total} coupons.
        </p>
      )}
    </div>
  );
}
