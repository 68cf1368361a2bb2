import { useMemo, useRef } from 'react';
import { useFieldArray, useForm } from 'react-hook-form';
import { GAUGE_UNITS, type GaugeUnit, type RunStage } from '../../../../shared/constants/records';
import { DomainError } from '../../../../shared/domain/errors';
import { WEATHER_ALLOWANCE, chamberPressure, standardPressureAtAltitude } from '../../../../shared/domain/vacuum';
import { recordStageSchema, type RecordStageInput, type RunDetail, type RunStageOut } from '../../../../shared/schemas/runs';
import { STAGE_LABELS } from '../../../../shared/runs/stages';
import { vacuumStartWarning } from '../../../../shared/runs/contradictions';
import { EntryWarnings, useGoOnAnyway } from '../../../components/ui/entry-warnings';
import { convertPressure, METRES_PER_FOOT, PA_PER_INHG } from '../../../../shared/units';
import { Field, FormError } from '../../../components/ui/field';
import { NumberField } from '../../../components/ui/number-field';
import { applyServerErrors } from '../../../lib/form-errors';
import { renameFields } from '../../../lib/form-values';
import { fromLocalInput, toLocalInput } from '../../../lib/format/dates';
import { numberInput, toBox, toSi, type DisplayUnits } from '../../../lib/forms/number-input';
import { convertingResolver } from '../../../lib/forms/resolver';
import { useUnits, type Units } from '../../../lib/use-units';
import { useRecordStage } from '../api/use-record-stage';

interface ReadingValues {
  at: string;
  gaugeValue: number | null;
  gaugeUnit: GaugeUnit;
}

/** What the form holds: times as the browser's local wall time, numbers in the user's unit. */
export interface StageFormValues {
  startedAt: string;
  endedAt: string;
  plannedHours: number | null;
  plannedMins: number | null;
  bubblingStoppedAt: string;
  /** The shop's barometer, in the user's pressure unit; empty when the shop has none. */
  barometer: number | null;
  ovenSetC: number | null;
  ovenMeasuredC: number | null;
  notes: string;
  readings: ReadingValues[];
}

const hasOven = (s: RunStage) => s === 'drying' || s === 'cure';

interface StageContext {
  stage: RunStage;
  mode: 'start' | 'open';
  /** The stage as recorded, when the form adds to an open one. */
  existing?: Pick<RunStageOut, 'startedAt'>;
  /** "End" was pressed (rather than "Save without ending"). */
  end: boolean;
  units: DisplayUnits;
}

/**
 * The form's values as the contract's input: local times to ISO instants, hours and minutes to minutes,
 * oven temperatures to °C, blank gauge rows left out. Pure, so it is tested on its own.
 */
export function toStageInput(v: StageFormValues, { stage, mode, existing, end, units }: StageContext): Record<string, unknown> {
  const when = (s: string) => fromLocalInput(s) ?? undefined;
  const h = v.plannedHours;
  const m = v.plannedMins;
  const plannedMinutes = h === null && m === null ? null : Math.round((h ?? 0) * 60 + (m ?? 0));
  const input: Record<string, unknown> = {
    stage,
    // An open stage keeps its recorded start to the second; the form only shows it to the minute.
    startedAt: mode === 'open' && existing ? existing.startedAt : when(v.startedAt),
    plannedMinutes: plannedMinutes === 0 ? null : plannedMinutes,
    notes: v.notes.trim() === '' ? null : v.notes.trim(),
    readings: v.readings.filter((r) => r.gaugeValue !== null).map((r) => ({ at: when(r.at), gaugeValue: r.gaugeValue, gaugeUnit: r.gaugeUnit })),
  };
  if (end) input.endedAt = when(v.endedAt);
  if (stage === 'vacuum') {
    input.bubblingStoppedAt = fromLocalInput(v.bubblingStoppedAt);
    input.barometerKpa = toSi(v.barometer, 'pressure', units);
  }
  if (hasOven(stage)) {
    input.ovenSetC = toSi(v.ovenSetC, 'temperature', units);
    input.ovenMeasuredC = toSi(v.ovenMeasuredC, 'temperature', units);
  }
  return input;
}

// The contract names fields in SI; the form's fields carry the same names except the planned length.
const RENAMES = { plannedMinutes: 'plannedHours', barometerKpa: 'barometer' };
const REQUIRED = { startedAt: 'Enter a date and time', endedAt: 'Enter a date and time' };

/**
 * Why gauge readings are turned into absolute pressure, in the user's units. The rate is the standard
 * atmosphere's near sea level (ISO 2533): about 1 inHg per 1,000 ft, i.e. 3.39 kPa per 304.8 m.
 */
export function gaugeNote(units: { format: (v: number, q: 'pressure' | 'altitude') => string }): string {
  return `A vacuum gauge shows how far below the local air pressure the chamber is, and reads about ${units.format(PA_PER_INHG / 1000, 'pressure')} less per ${units.format(1000 * METRES_PER_FOOT, 'altitude')} of altitude; absolute pressure and % vacuum are what compare across shops and altitudes.`;
}

type FormatUnits = Pick<Units, 'format'>;

/**
 * Which ambient the readings are subtracted from, in words: the shop's barometer when the box holds a
 * plausible reading (kPa), else the ISO 2533 standard atmosphere at the run's altitude; with the weather
 * allowance and what happens within it. Pure, so it is tested on its own.
 */
export function ambientText(barometerKpa: number | null, altitudeM: number, units: FormatUnits): string {
  const allowance = `A gauge may read up to ${WEATHER_ALLOWANCE * 100} % more vacuum than that (weather, gauge error); the absolute pressure is then taken as 0.`;
  if (barometerKpa !== null && Number.isFinite(barometerKpa)) {
    return `Readings are worked out against the shop's barometer, ${units.format(barometerKpa, 'pressure')}. ${allowance}`;
  }
  let standard: string;
  try {
    standard = units.format(standardPressureAtAltitude(altitudeM), 'pressure');
  } catch (e) {
    if (!(e instanceof DomainError)) throw e;
    standard = 'unknown';
  }
  return `Readings are worked out against the ISO 2533 standard atmosphere at ${units.format(altitudeM, 'altitude')}, ${standard}; a barometer reading takes its place. ${allowance}`;
}

/** One gauge reading as the preview words it, with the same arithmetic the server uses. Pure. */
export function readingPreviewText(
  value: number | null | undefined,
  unit: GaugeUnit,
  where: { altitudeM: number; barometerKpa: number | null },
  units: FormatUnits,
): { text: string; problem: boolean } | null {
  const n = value ?? null;
  if (n === null) return null;
  if (Number.isNaN(n)) return { text: 'not a number', problem: true };
  const barometerKpa = where.barometerKpa !== null && Number.isFinite(where.barometerKpa) ? where.barometerKpa : null;
  try {
    const p = chamberPressure(convertPressure(n, unit, 'kPa'), { altitudeM: where.altitudeM, barometerKpa });
    const against = p.ambientSource === 'barometer' ? 'the barometer' : 'the standard atmosphere';
    const text = p.clamped
      ? `= 0 absolute, 100 % vacuum: more vacuum than ${against} (${units.format(p.ambientKpa, 'pressure')}), within the weather allowance, so taken as 0`
      : `= ${units.format(p.absoluteKpa, 'pressure')} absolute, ${p.percentVacuum.toFixed(1)} % vacuum against ${against}`;
    return { text, problem: false };
  } catch (e) {
    if (!(e instanceof DomainError)) throw e;
    if (e.field === 'barometerKpa') return { text: 'the barometer reading is not a plausible air pressure', problem: true };
    if (e.code === 'vacuum-exceeds-ambient') {
      return {
        text: `more vacuum than ${barometerKpa !== null ? 'the barometer reading' : 'the air pressure at this altitude'} allows, even on a high-pressure day: check the unit`,
        problem: true,
      };
    }
    return { text: 'a gauge cannot read below zero', problem: true };
  }
}

/** Live preview of one gauge reading against the ambient in use. */
function ReadingPreview({
  value,
  unit,
  altitudeM,
  barometerKpa,
}: {
  value: number | null | undefined;
  unit: GaugeUnit;
  altitudeM: number;
  barometerKpa: number | null;
}) {
  const units = useUnits();
  const preview = readingPreviewText(value, unit, { altitudeM, barometerKpa }, units);
  if (!preview) return null;
  return <span className={preview.problem ? 'text-margin' : 'text-ink-soft'}>{preview.text}</span>;
}

function ErrorText({ id, message }: { id: string; message?: string }) {
  if (!message) return null;
  return (
    <p id={id} role="alert" className="mt-1 text-sm text-margin">
      {message}
    </p>
  );
}

/**
 * Start a stage (mode "start") or add to the open one: gauge readings, oven temperatures, bubbling
 * time, and its end (mode "open"). Every value is converted to the stored units before it is sent.
 */
export function StageForm({
  run,
  stage,
  mode,
  existing,
  onSaved,
}: {
  run: RunDetail;
  stage: RunStage;
  mode: 'start' | 'open';
  existing?: RunStageOut;
  onSaved: (message: string) => void;
}) {
  const units = useUnits();
  const record = useRecordStage(run.id);
  const defaultUnit: GaugeUnit = units.unit('pressure') === 'inHg' ? 'inHg' : 'kPa';
  const temp = (c: number | null | undefined) => (c == null ? null : Number(units.toDisplay(c, 'temperature').toFixed(1)));
  const now = toLocalInput(new Date());
  // Which button was pressed decides whether the stage ends; the resolver reads it when the form is checked.
  const ending = useRef(false);
  const resolver = useMemo(
    () =>
      convertingResolver<StageFormValues, typeof recordStageSchema>(
        recordStageSchema,
        (v) => toStageInput(v, { stage, mode, existing, end: ending.current, units }),
        RENAMES,
        mode === 'start' ? { startedAt: REQUIRED.startedAt } : {},
      ),
    [stage, mode, existing, units],
  );
  const form = useForm<StageFormValues, unknown, RecordStageInput>({
    resolver,
    defaultValues: {
      startedAt: existing ? toLocalInput(existing.startedAt) : now,
      endedAt: now,
      plannedHours: existing?.plannedMinutes != null ? Math.floor(existing.plannedMinutes / 60) : null,
      plannedMins: existing?.plannedMinutes != null ? existing.plannedMinutes % 60 : null,
      bubblingStoppedAt: existing?.bubblingStoppedAt ? toLocalInput(existing.bubblingStoppedAt) : '',
      barometer: toBox(existing?.barometerKpa, 'pressure', units),
      ovenSetC: temp(existing?.ovenSetC),
      ovenMeasuredC: temp(existing?.ovenMeasuredC),
      notes: existing?.notes ?? '',
      readings: stage === 'vacuum' && mode === 'start' ? [{ at: now, gaugeValue: null, gaugeUnit: defaultUnit }] : [],
    },
  });
  const readings = useFieldArray({ control: form.control, name: 'readings' });
  const { errors } = form.formState;
  const watched = form.watch('readings');
  const barometerBox = form.watch('barometer');
  const barometerKpa = barometerBox === null || Number.isNaN(barometerBox) ? null : units.fromDisplay(barometerBox, 'pressure');
  const label = STAGE_LABELS[stage];
  const lower = label.toLowerCase();
  const idp = `st-${run.id}-${stage}-${mode}`;
  // Once the vacuum starts the resin goes in: a coupon without a dry weight then has no uptake, ever.
  const contradictions = useMemo(() => {
    if (stage !== 'vacuum' || mode !== 'start') return [];
    const w = vacuumStartWarning(run.coupons.map((c) => ({ id: c.id, tag: c.tag, role: c.role, hasDryWeighing: c.stagesWeighed.includes('dry') })));
    return w ? [w] : [];
  }, [run.coupons, stage, mode]);
  const gate = useGoOnAnyway(contradictions);

  const submit = (end: boolean) => {
    ending.current = end;
    return form.handleSubmit(async (input) => {
      if (!gate.mayGoOn()) return;
      try {
        await record.mutateAsync(input);
        form.setValue('readings', []);
        // The form may go away with the change (an ended stage has none), so the page says what happened.
        onSaved(mode === 'start' ? `${label} started.` : end ? `${label} ended.` : `${label} saved.`);
      } catch (err) {
        applyServerErrors(renameFields(err, RENAMES), form.setError, [
          'startedAt',
          'endedAt',
          'plannedHours',
          'bubblingStoppedAt',
          'barometer',
          'ovenSetC',
          'ovenMeasuredC',
          'notes',
          ...form.getValues('readings').flatMap((_, i) => [`readings.${i}.at`, `readings.${i}.gaugeValue`, `readings.${i}.gaugeUnit`]),
        ]);
      }
    });
  };

  return (
    <form
      noValidate
      onSubmit={(e) => void submit(mode === 'start' ? false : true)(e)}
      aria-label={mode === 'start' ? `Start ${lower}` : `Record ${lower}`}
      className="mt-3 rounded border border-rule bg-white/40 p-4"
    >
      <FormError message={errors.root?.message} />
      <div className="grid gap-x-4 sm:grid-cols-2">
        {mode === 'start' ? (
          <Field label={`${label} started at`} type="datetime-local" registration={form.register('startedAt')} error={errors.startedAt?.message} />
        ) : (
          <Field
            label={`${label} ended at`}
            type="datetime-local"
            registration={form.register('endedAt')}
            error={errors.endedAt?.message}
            hint="Used only by the “End” button."
          />
        )}
        <fieldset className="mb-3">
          <legend className="field-label">Planned length</legend>
          <div className="flex items-center gap-2">
            <label htmlFor={`${idp}-ph`} className="sr-only">
              Planned length, hours
            </label>
            <input
              id={`${idp}-ph`}
              inputMode="numeric"
              className="field-input w-20"
              aria-invalid={errors.plannedHours ? true : undefined}
              aria-describedby={errors.plannedHours ? `${idp}-ph-error` : undefined}
              {...form.register('plannedHours', numberInput)}
            />
            <span aria-hidden="true">h</span>
            <label htmlFor={`${idp}-pm`} className="sr-only">
              Planned length, minutes
            </label>
            <input
              id={`${idp}-pm`}
              inputMode="numeric"
              className="field-input w-20"
              aria-invalid={errors.plannedMins ? true : undefined}
              aria-describedby={errors.plannedMins ? `${idp}-pm-error` : undefined}
              {...form.register('plannedMins', numberInput)}
            />
            <span aria-hidden="true">min</span>
          </div>
          <ErrorText id={`${idp}-ph-error`} message={errors.plannedHours?.message} />
          <ErrorText id={`${idp}-pm-error`} message={errors.plannedMins?.message} />
        </fieldset>
      </div>

      {stage === 'vacuum' && (
        <fieldset className="mb-3">
          <legend className="field-label">Gauge readings</legend>
          <p className="mb-2 text-xs text-ink-faint">{gaugeNote(units)}</p>
          <NumberField
            className="max-w-xs"
            form={form}
            name="barometer"
            label="Shop barometer (optional)"
            quantity="pressure"
            hint="The air pressure the barometer in the shop shows now (station pressure), not the sea-level figure of a weather report."
          />
          <p id={`${idp}-ambient`} className="mb-2 text-sm text-ink-soft" aria-live="polite">
            {ambientText(barometerKpa, run.altitudeM, units)}
          </p>
          {readings.fields.length === 0 && <p className="text-sm text-ink-soft">No new reading.</p>}
          <ol className="space-y-2">
            {readings.fields.map((f, i) => {
              const e = errors.readings?.[i];
              const w = watched[i];
              return (
                <li key={f.id} className="flex flex-wrap items-end gap-2">
                  <div>
                    <label htmlFor={`${idp}-r${i}-at`} className="field-label">
                      Reading {i + 1} at
                    </label>
                    <input
                      id={`${idp}-r${i}-at`}
                      type="datetime-local"
                      className="field-input"
                      aria-invalid={e?.at ? true : undefined}
                      aria-describedby={e?.at ? `${idp}-r${i}-at-error` : undefined}
                      {...form.register(`readings.${i}.at`)}
                    />
                    <ErrorText id={`${idp}-r${i}-at-error`} message={e?.at?.message} />
                  </div>
                  <div>
                    <label htmlFor={`${idp}-r${i}-v`} className="field-label">
                      Gauge shows
                    </label>
                    <input
                      id={`${idp}-r${i}-v`}
                      inputMode="decimal"
                      className="field-input w-28"
                      aria-invalid={e?.gaugeValue ? true : undefined}
                      aria-describedby={[`${idp}-r${i}-preview`, e?.gaugeValue ? `${idp}-r${i}-v-error` : ''].filter(Boolean).join(' ')}
                      {...form.register(`readings.${i}.gaugeValue`, numberInput)}
                    />
                    <ErrorText id={`${idp}-r${i}-v-error`} message={e?.gaugeValue?.message} />
                  </div>
                  <div>
                    <label htmlFor={`${idp}-r${i}-u`} className="field-label">
                      Gauge unit
                    </label>
                    <select id={`${idp}-r${i}-u`} className="field-input" {...form.register(`readings.${i}.gaugeUnit`)}>
                      {GAUGE_UNITS.map((u) => (
                        <option key={u} value={u}>
                          {u}
                        </option>
                      ))}
                    </select>
                  </div>
                  <p id={`${idp}-r${i}-preview`} className="pb-2 text-sm" aria-live="polite">
                    {w && <ReadingPreview value={w.gaugeValue} unit={w.gaugeUnit} altitudeM={run.altitudeM} barometerKpa={barometerKpa} />}
                  </p>
                  <button type="button" className="btn-quiet mb-1" onClick={() => readings.remove(i)}>
                    Remove<span className="sr-only"> reading {i + 1}</span>
                  </button>
                </li>
              );
            })}
          </ol>
          <button
            type="button"
            className="btn-quiet mt-2"
            onClick={() => readings.append({ at: toLocalInput(new Date()), gaugeValue: null, gaugeUnit: watched.at(-1)?.gaugeUnit ?? defaultUnit })}
          >
            Add a gauge reading
          </button>
          <div className="mt-3 max-w-xs">
            <Field
              label="Bubbling stopped at (optional)"
              type="datetime-local"
              registration={form.register('bubblingStoppedAt')}
              error={errors.bubblingStoppedAt?.message}
            />
          </div>
        </fieldset>
      )}

      {hasOven(stage) && (
        <div className="grid gap-x-4 sm:grid-cols-2">
          <NumberField form={form} name="ovenSetC" label="Oven set point" quantity="temperature" />
          <NumberField
            form={form}
            name="ovenMeasuredC"
            label="Separate thermometer in the oven"
            quantity="temperature"
            hint="Small ovens often read low against their own dial; the thermometer's reading is the one the checks use."
          />
        </div>
      )}
      <div className="mb-3">
        <label htmlFor={`${idp}-notes`} className="field-label">
          Notes (optional)
        </label>
        <textarea id={`${idp}-notes`} rows={2} className="field-input" {...form.register('notes')} />
      </div>
      <EntryWarnings warnings={contradictions} gate={gate} action={`start the ${lower}`} className="mb-3" />
      <div className="flex flex-wrap gap-2">
        {mode === 'start' ? (
          <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
            Start {lower}
          </button>
        ) : (
          <>
            <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
              End {lower}
            </button>
            <button type="button" className="btn-quiet" disabled={form.formState.isSubmitting} onClick={(e) => void submit(false)(e)}>
              Save without ending
            </button>
          </>
        )}
      </div>
    </form>
  );
}
