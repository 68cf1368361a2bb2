import { useQuery } from '@tanstack/react-query';
import { useEffect, useMemo, useState } from 'react';
import { useFieldArray, useForm, type Resolver } from 'react-hook-form';
import { useNavigate, useParams } from 'react-router-dom';
import type { Resin, Species } from '../../../../shared/schemas/reference';
import type { CreateTrialInput } from '../../../../shared/schemas/trials';
import { planningWarnings } from '../../../../shared/trials/planning';
import { Field, FormError, TextAreaField, FormActions } from '../../../components/ui/field';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { applyServerErrors } from '../../../lib/form-errors';
import { useUnits } from '../../../lib/use-units';
import { trialQuery } from '../../../lib/queries/records';
import { usePlanChoices } from '../hooks/use-plan-choices';
import { useCreateTrial } from '../api/use-create-trial';
import { useUpdateTrial } from '../api/use-update-trial';
import { numberOrNull, textOrNull } from '../../../lib/form-values';
import { buildPlan, cellKey, checkPlan, formFieldOf, planValuesFromTrial, type PlanValues, type ProcessRow } from './plan-values';
import { PlanningWarnings } from './planning-warnings';
import { SampleSizeOffer } from './sample-size-offer';
import { paths } from '../../../config/paths';

const emptyProcess = (): ProcessRow => ({
  processLabel: '',
  vacuumMinutes: null,
  soakMinutes: null,
  cureTemp: null,
  cureMinutes: null,
  thickness: null,
  cells: {},
});

export function TrialPlanScreen() {
  const choices = usePlanChoices();
  const create = useCreateTrial();
  return (
    <Page title="Plan a trial">
      {choices.isPending ? (
        <Loading />
      ) : !choices.data ? (
        <ErrorNote error={choices.error} />
      ) : (
        <PlanForm species={choices.data.species} resins={choices.data.resins} save={(input) => create.mutateAsync(input)} cancelTo={paths.trials.href()} />
      )}
    </Page>
  );
}

/** The same form on a saved trial: the grid is replaced as a whole; cells that already have coupons stay (the server refuses their removal). */
export function TrialEditPlanScreen() {
  const id = Number(useParams().id);
  const choices = usePlanChoices();
  const trial = useQuery(trialQuery(id));
  const update = useUpdateTrial(id);
  const units = useUnits();
  const pending = choices.isPending || trial.isPending;
  const error = choices.error ?? trial.error;
  return (
    <Page title={trial.data ? `Edit the plan of ${trial.data.code}` : 'Edit the plan'}>
      {pending ? (
        <Loading />
      ) : error || !choices.data || !trial.data ? (
        <ErrorNote error={error} />
      ) : trial.data.status === 'closed' ? (
        <p>This trial is closed; change its status on the trial page before changing the plan.</p>
      ) : (
        <PlanForm
          species={choices.data.species}
          resins={choices.data.resins}
          initial={planValuesFromTrial(trial.data, { temp: (c) => units.toDisplay(c, 'temperature'), length: (mm) => units.toDisplay(mm, 'length') })}
          save={(input) => update.mutateAsync(input)}
          cancelTo={paths.trial.href({ id: id })}
        />
      )}
    </Page>
  );
}

interface PlanFormProps {
  species: readonly Species[];
  resins: readonly Resin[];
  initial?: PlanValues;
  save: (input: CreateTrialInput) => Promise<{ id: number }>;
  cancelTo: string;
}

function PlanForm({ species, resins, initial, save, cancelTo }: PlanFormProps) {
  const units = useUnits();
  const navigate = useNavigate();
  const conv = useMemo(
    () => ({ tempToC: (v: number) => units.fromDisplay(v, 'temperature'), lengthToMm: (v: number) => units.fromDisplay(v, 'length') }),
    [units],
  );
  const resolver: Resolver<PlanValues, unknown, CreateTrialInput> = (values) => {
    const checked = checkPlan(values, conv);
    return checked.ok ? { values: checked.data, errors: {} } : { values: {}, errors: checked.errors };
  };
  const form = useForm<PlanValues, unknown, CreateTrialInput>({
    resolver,
    defaultValues: initial ?? {
      title: '',
      question: '',
      controlsPerSpecies: 2,
      notes: null,
      speciesIds: [],
      resinIds: [],
      couponsPerCondition: 5,
      processes: [emptyProcess()],
    },
  });
  const processes = useFieldArray({ control: form.control, name: 'processes' });
  const { errors } = form.formState;
  const values = form.watch();

  const speciesById = new Map(species.map((s) => [String(s.id), s]));
  const resinById = new Map(resins.map((r) => [String(r.id), r]));
  // Keep the picking order of the lists, whatever order the boxes were ticked in.
  const pickedSpecies = species.filter((s) => values.speciesIds.includes(String(s.id)));
  const pickedResins = resins.filter((r) => values.resinIds.includes(String(r.id)));

  // Checked on every render: the plan is small, and the warnings should follow each keystroke.
  const warnings = (() => {
    const built = buildPlan({ ...values, speciesIds: pickedSpecies.map((s) => String(s.id)), resinIds: pickedResins.map((r) => String(r.id)) }, conv);
    const conditions = built.input.conditions.flatMap((c) =>
      c.speciesId !== undefined && c.resinId !== undefined && typeof c.couponsWanted === 'number' && Number.isFinite(c.couponsWanted)
        ? [{ ...c, speciesId: c.speciesId, resinId: c.resinId, processLabel: c.processLabel?.trim() || 'unnamed process', couponsWanted: c.couponsWanted }]
        : [],
    );
    if (conditions.length === 0) return [];
    return planningWarnings(
      { controlsPerSpecies: values.controlsPerSpecies ?? 0, conditions },
      {
        speciesName: (id) => speciesById.get(String(id))?.commonName ?? `species ${id}`,
        resin: (id) => resinById.get(String(id)),
        units: units.prefs,
      },
    );
  })();

  const [speciesFilter, setSpeciesFilter] = useState('');
  const shownSpecies = species.filter((s) => `${s.commonName} ${s.botanicalName}`.toLowerCase().includes(speciesFilter.trim().toLowerCase()));

  const onSubmit = form.handleSubmit(async (input) => {
    try {
      const trial = await save(input);
      navigate(paths.trial.href({ id: trial.id }));
    } catch (err) {
      // The server names contract paths; move them onto the boxes, as the form's own check does.
      const { origins } = buildPlan(form.getValues(), conv);
      if (err instanceof ApiError) {
        const moved: Record<string, string[]> = {};
        for (const [k, v] of Object.entries(err.fieldErrors)) (moved[formFieldOf(k, origins)] ??= []).push(...v);
        applyServerErrors(new ApiError(err.status, err.code, err.message, moved, err.requestId), form.setError, Object.keys(moved));
      } else applyServerErrors(err, form.setError, []);
    }
  });

  const tempLabel = units.label('temperature');
  const lengthLabel = units.label('length');
  const cellCount = pickedSpecies.length * pickedResins.length * values.processes.length;
  // The grid's own error belongs to no box, so no box's change re-checks it; drop it once the grid has cells.
  const gridError = errors.grid?.message;
  useEffect(() => {
    if (gridError && cellCount > 0 && cellCount <= 200) form.clearErrors('grid');
  }, [gridError, cellCount, form]);

  return (
    <form onSubmit={onSubmit} noValidate aria-label={initial ? 'Edit the plan' : 'Plan a trial'} className="max-w-5xl">
      <FormError message={errors.root?.message} />
      <section aria-labelledby="question-heading" className="sheet mb-6 p-5">
        <h2 id="question-heading" className="mb-3">
          The question
        </h2>
        <Field label="Title" registration={form.register('title')} error={errors.title?.message} hint='Short, e.g. "Dyed blend in soft maples"' />
        <TextAreaField
          label="Question the trial answers"
          registration={form.register('question')}
          error={errors.question?.message}
          hint='e.g. "Does a 6 h vacuum give spalted box elder more resin than 3 h?"'
        />
        <div className="grid gap-x-4 sm:grid-cols-2">
          <Field
            label="Untreated controls per species"
            type="number"
            min="0"
            step="1"
            inputMode="numeric"
            registration={form.register('controlsPerSpecies', numberOrNull)}
            error={errors.controlsPerSpecies?.message}
            hint="Coupons of each species that get no resin, to compare hardness and stability against"
          />
        </div>
        <TextAreaField label="Notes" registration={form.register('notes', textOrNull)} error={errors.notes?.message} />
      </section>

      <section aria-labelledby="factors-heading" className="sheet mb-6 p-5">
        <h2 id="factors-heading" className="mb-3">
          Species and resins
        </h2>
        <div className="grid gap-6 md:grid-cols-2">
          <fieldset aria-describedby={errors.speciesIds ? 'species-error' : undefined}>
            <legend className="field-label">Species in the trial</legend>
            <label htmlFor="species-filter" className="mt-2 block text-xs text-ink-soft">
              Narrow the list
            </label>
            <input id="species-filter" type="search" className="field-input mb-2" value={speciesFilter} onChange={(e) => setSpeciesFilter(e.target.value)} />
            <div className="max-h-64 overflow-y-auto rounded border border-paper-edge bg-white/50 p-2">
              {shownSpecies.map((s) => (
                <label key={s.id} className="flex items-baseline gap-2 py-0.5 text-sm">
                  <input type="checkbox" value={String(s.id)} {...form.register('speciesIds')} />
                  <span>
                    {s.commonName} <i className="text-xs text-ink-soft">{s.botanicalName}</i>
                  </span>
                </label>
              ))}
              {shownSpecies.length === 0 && <p className="text-sm text-ink-soft">No species match.</p>}
            </div>
            {errors.speciesIds?.message && (
              <p id="species-error" role="alert" className="mt-1 text-sm text-margin">
                {errors.speciesIds.message}
              </p>
            )}
          </fieldset>
          <fieldset aria-describedby={errors.resinIds ? 'resins-error' : undefined}>
            <legend className="field-label">Resins in the trial</legend>
            <div className="mt-2 rounded border border-paper-edge bg-white/50 p-2">
              {resins.map((r) => (
                <label key={r.id} className="flex items-baseline gap-2 py-0.5 text-sm">
                  <input type="checkbox" value={String(r.id)} {...form.register('resinIds')} />
                  <span>
                    {r.name}{' '}
                    <span className="text-xs text-ink-soft">
                      cures at {units.format(r.cureMinC, 'temperature', false)}–{units.format(r.cureMaxC, 'temperature')}
                    </span>
                  </span>
                </label>
              ))}
              {resins.length === 0 && <p className="text-sm text-ink-soft">No resins yet; the admin adds them under Reference.</p>}
            </div>
            {errors.resinIds?.message && (
              <p id="resins-error" role="alert" className="mt-1 text-sm text-margin">
                {errors.resinIds.message}
              </p>
            )}
          </fieldset>
        </div>
      </section>

      <section aria-labelledby="process-heading" className="sheet mb-6 p-5">
        <h2 id="process-heading" className="mb-1">
          Process settings
        </h2>
        <p className="mb-3 text-sm text-ink-soft">
          Each set of settings is tried with every species and resin picked. Leave a box empty when the trial does not fix it.
        </p>
        {processes.fields.map((f, i) => {
          const pe = errors.processes?.[i];
          return (
            <fieldset key={f.id} className="mb-4 rounded border border-paper-edge p-3">
              <legend className="px-1 text-sm font-semibold">Process settings {i + 1}</legend>
              <div className="grid gap-x-4 sm:grid-cols-3">
                <Field
                  label="Name"
                  registration={form.register(`processes.${i}.processLabel`)}
                  error={pe?.processLabel?.message}
                  hint='e.g. "4 h vacuum, overnight soak"'
                />
                <Field
                  label="Vacuum (min)"
                  type="number"
                  min="0"
                  step="1"
                  inputMode="numeric"
                  registration={form.register(`processes.${i}.vacuumMinutes`, numberOrNull)}
                  error={pe?.vacuumMinutes?.message}
                  hint="240 min is 4 h"
                />
                <Field
                  label="Soak (min)"
                  type="number"
                  min="0"
                  step="1"
                  inputMode="numeric"
                  registration={form.register(`processes.${i}.soakMinutes`, numberOrNull)}
                  error={pe?.soakMinutes?.message}
                  hint="At least twice the vacuum time is common practice"
                />
                <Field
                  label={`Cure temperature (${tempLabel})`}
                  type="number"
                  step="1"
                  inputMode="decimal"
                  registration={form.register(`processes.${i}.cureTemp`, numberOrNull)}
                  error={pe?.cureTemp?.message}
                />
                <Field
                  label="Cure time (min)"
                  type="number"
                  min="0"
                  step="1"
                  inputMode="numeric"
                  registration={form.register(`processes.${i}.cureMinutes`, numberOrNull)}
                  error={pe?.cureMinutes?.message}
                />
                <Field
                  label={`Coupon thickness (${lengthLabel})`}
                  type="number"
                  step="any"
                  inputMode="decimal"
                  registration={form.register(`processes.${i}.thickness`, numberOrNull)}
                  error={pe?.thickness?.message}
                />
              </div>
              {processes.fields.length > 1 && (
                <button type="button" className="btn-quiet" onClick={() => processes.remove(i)}>
                  Remove process settings {i + 1}
                </button>
              )}
            </fieldset>
          );
        })}
        <button type="button" className="btn-quiet" onClick={() => processes.append(emptyProcess(), { shouldFocus: true })}>
          Add another set of process settings
        </button>
      </section>

      <section aria-labelledby="grid-heading" className="sheet mb-6 p-5">
        <h2 id="grid-heading" className="mb-1">
          Conditions grid
        </h2>
        <p className="mb-3 text-sm text-ink-soft" id="grid-help">
          Coupons per condition. An empty cell plans the number below; 0 leaves that cell out.
        </p>
        <div className="grid gap-x-4 sm:grid-cols-3">
          <Field
            label="Coupons in an empty cell"
            type="number"
            min="1"
            step="1"
            inputMode="numeric"
            registration={form.register('couponsPerCondition', numberOrNull)}
            error={errors.couponsPerCondition?.message}
          />
        </div>
        {gridError && (
          <p role="alert" className="mb-3 text-sm text-margin">
            {gridError}
          </p>
        )}
        {cellCount === 0 ? (
          <p className="text-sm text-ink-soft">Pick at least one species and one resin to fill the grid.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="data-table w-auto">
              <caption className="sr-only">Coupons planned per species, resin and process settings</caption>
              <thead>
                <tr>
                  <th scope="col">Species</th>
                  {pickedResins.map((r) =>
                    values.processes.map((p, pi) => (
                      <th scope="col" key={`${r.id}-${processes.fields[pi]?.id ?? pi}`}>
                        {r.name}
                        <span className="block text-xs font-normal">{p.processLabel.trim() || `process settings ${pi + 1}`}</span>
                      </th>
                    )),
                  )}
                </tr>
              </thead>
              <tbody>
                {pickedSpecies.map((s) => (
                  <tr key={s.id}>
                    <th scope="row" className="border-b border-paper-edge text-left font-normal text-ink">
                      {s.commonName}
                    </th>
                    {pickedResins.map((r) =>
                      values.processes.map((p, pi) => {
                        const key = cellKey(s.id, r.id);
                        const err = errors.processes?.[pi]?.cells?.[key]?.message;
                        const inputId = `cell-${pi}-${key}`;
                        return (
                          <td key={`${r.id}-${processes.fields[pi]?.id ?? pi}`}>
                            <label htmlFor={inputId} className="sr-only">
                              Coupons of {s.commonName} with {r.name}, {p.processLabel.trim() || `process settings ${pi + 1}`}
                            </label>
                            <input
                              id={inputId}
                              type="number"
                              min="0"
                              step="1"
                              inputMode="numeric"
                              className="w-20 rounded border border-rule bg-white/70 px-2 py-1 tabular-nums"
                              placeholder={values.couponsPerCondition === null ? '' : String(values.couponsPerCondition)}
                              aria-invalid={err ? true : undefined}
                              aria-describedby={err ? `${inputId}-error` : 'grid-help'}
                              {...form.register(`processes.${pi}.cells.${key}`, numberOrNull)}
                            />
                            {err && (
                              <p id={`${inputId}-error`} role="alert" className="mt-1 max-w-40 text-xs text-margin">
                                {err}
                              </p>
                            )}
                          </td>
                        );
                      }),
                    )}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>

      <SampleSizeOffer species={pickedSpecies} resins={pickedResins} couponsPerCondition={values.couponsPerCondition ?? undefined} />

      <PlanningWarnings warnings={warnings} heading="Before you save: what this plan may not be able to answer" />

      <FormActions submitLabel="Save the plan" busy={form.formState.isSubmitting} onCancel={() => navigate(cancelTo)} />
    </form>
  );
}
