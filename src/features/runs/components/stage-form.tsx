import { useFieldArray, useForm, type UseFormRegister, type UseFormSetError } from 'react-hook-form';
import { GAUGE_UNITS, type GaugeUnit, type RunStage } from '../../../../shared/constants/records';
import { DomainError, absolutePressureFromGauge, percentVacuum } from '../../../../shared/domain/index';
import { recordStageSchema, type RecordStageInput, type RunDetail, type RunStageOut } from '../../../../shared/schemas/runs';
import { STAGE_LABELS } from '../../../../shared/runs/stages';
import { convertPressure } from '../../../../shared/units';
import { FormError } from '../../../components/ui/field';
import { applyServerErrors } from '../../../lib/form-errors';
import { useUnits } from '../../../lib/use-units';
import { useRecordStage } from '../api/use-record-stage';
import { fromLocalInput, toLocalInput } from './time-text';

interface ReadingValues {
  at: string;
  gaugeValue: string;
  gaugeUnit: GaugeUnit;
}

/** What the form holds: times as the browser's local wall time, temperatures in the user's unit. */
interface StageFormValues {
  startedAt: string;
  endedAt: string;
  plannedHours: string;
  plannedMins: string;
  bubblingStoppedAt: string;
  ovenSetC: string;
  ovenMeasuredC: string;
  notes: string;
  readings: ReadingValues[];
}

type FieldName = keyof StageFormValues | `readings.${number}.${keyof ReadingValues}`;

const num = (s: string): number | null => {
  const t = s.trim().replace(',', '.');
  if (t === '') return null;
  const n = Number(t);
  return Number.isFinite(n) ? n : NaN;
};

// The contract names fields in SI; the form's fields carry the same names except the planned length.
function formField(path: string): FieldName {
  if (path === 'plannedMinutes') return 'plannedHours';
  return path as FieldName;
}

const hasOven = (s: RunStage) => s === 'drying' || s === 'cure';

export const GAUGE_NOTE =
  'A vacuum gauge shows how far below the local air pressure the chamber is, and reads about 1 inHg less per 1,000 ft of altitude; absolute pressure and % vacuum are what compare across shops and altitudes.';

/** Live preview of one gauge reading at the run's altitude, with the same arithmetic the server uses. */
function ReadingPreview({ value, unit, altitudeM }: { value: string; unit: GaugeUnit; altitudeM: number }) {
  const units = useUnits();
  const n = num(value);
  if (n === null) return null;
  if (Number.isNaN(n)) return <span className="text-margin">not a number</span>;
  try {
    const abs = absolutePressureFromGauge(convertPressure(n, unit, 'kPa'), altitudeM);
    const pv = percentVacuum(abs, altitudeM);
    return (
      <span className="text-ink-soft">
        = {units.format(abs, 'pressure')} absolute, {pv.toFixed(1)} % vacuum
      </span>
    );
  } catch (e) {
    if (!(e instanceof DomainError)) throw e;
    return <span className="text-margin">{e.code === 'vacuum-exceeds-ambient' ? 'more vacuum than the air pressure at this altitude: check the unit' : 'a gauge cannot read below zero'}</span>;
  }
}

function ErrorText({ id, message }: { id: string; message?: string }) {
  if (!message) return null;
  return (
    <p id={id} role="alert" className="mt-1 text-sm text-margin">
      {message}
    </p>
  );
}

function Input({
  id,
  label,
  name,
  register,
  error,
  hint,
  type = 'text',
  inputMode,
}: {
  id: string;
  label: string;
  name: FieldName;
  register: UseFormRegister<StageFormValues>;
  error?: string;
  hint?: string;
  type?: string;
  inputMode?: 'decimal' | 'numeric';
}) {
  const describedBy = [hint ? `${id}-hint` : '', error ? `${id}-error` : ''].filter(Boolean).join(' ') || undefined;
  return (
    <div className="mb-3">
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      <input id={id} type={type} inputMode={inputMode} className="field-input" aria-invalid={error ? true : undefined} aria-describedby={describedBy} {...register(name)} />
      {hint && (
        <p id={`${id}-hint`} className="mt-1 text-xs text-ink-faint">
          {hint}
        </p>
      )}
      <ErrorText id={`${id}-error`} message={error} />
    </div>
  );
}

function placeIssues(issues: readonly { path: PropertyKey[]; message: string }[], setError: UseFormSetError<StageFormValues>): void {
  for (const i of issues) {
    const path = i.path.map(String).join('.');
    setError(path ? formField(path) : 'root', { message: i.message });
  }
}

/**
 * Start a stage (mode "start") or add to the open one: gauge readings, oven temperatures, bubbling
 * time, and its end (mode "open"). Every value is converted to the stored units before it is sent.
 */
export function StageForm({ run, stage, mode, existing, onSaved }: { run: RunDetail; stage: RunStage; mode: 'start' | 'open'; existing?: RunStageOut; onSaved: (message: string) => void }) {
  const units = useUnits();
  const record = useRecordStage(run.id);
  const defaultUnit: GaugeUnit = units.unit('pressure') === 'inHg' ? 'inHg' : 'kPa';
  const temp = (c: number | null | undefined) => (c == null ? '' : units.toDisplay(c, 'temperature').toFixed(1));
  const now = toLocalInput(new Date());
  const form = useForm<StageFormValues>({
    defaultValues: {
      startedAt: existing ? toLocalInput(existing.startedAt) : now,
      endedAt: now,
      plannedHours: existing?.plannedMinutes != null ? String(Math.floor(existing.plannedMinutes / 60)) : '',
      plannedMins: existing?.plannedMinutes != null ? String(existing.plannedMinutes % 60) : '',
      bubblingStoppedAt: existing?.bubblingStoppedAt ? toLocalInput(existing.bubblingStoppedAt) : '',
      ovenSetC: temp(existing?.ovenSetC),
      ovenMeasuredC: temp(existing?.ovenMeasuredC),
      notes: existing?.notes ?? '',
      readings: stage === 'vacuum' && mode === 'start' ? [{ at: now, gaugeValue: '', gaugeUnit: defaultUnit }] : [],
    },
  });
  const readings = useFieldArray({ control: form.control, name: 'readings' });
  const { errors } = form.formState;
  const watched = form.watch('readings');
  const label = STAGE_LABELS[stage];
  const lower = label.toLowerCase();
  const idp = `st-${run.id}-${stage}-${mode}`;
  const tempUnit = units.label('temperature');

  const submit = (end: boolean) =>
    form.handleSubmit(async (v) => {
      const bad: [FieldName, string][] = [];
      const number = (field: FieldName, s: string): number | null => {
        const n = num(s);
        if (Number.isNaN(n)) bad.push([field, 'Enter a number']);
        return n === null || Number.isNaN(n) ? null : n;
      };
      const when = (field: FieldName, s: string, required: boolean): string | null => {
        const iso = fromLocalInput(s);
        if (!iso && (required || s)) bad.push([field, 'Enter a date and time']);
        return iso;
      };
      // An open stage keeps its recorded start to the second; the form only shows it to the minute.
      const startedAt = mode === 'open' && existing ? existing.startedAt : when('startedAt', v.startedAt, true);
      const endedAt = end ? when('endedAt', v.endedAt, true) : undefined;
      const h = number('plannedHours', v.plannedHours);
      const m = number('plannedMins', v.plannedMins);
      const plannedMinutes = h === null && m === null ? null : Math.round((h ?? 0) * 60 + (m ?? 0));
      const set = number('ovenSetC', v.ovenSetC);
      const measured = number('ovenMeasuredC', v.ovenMeasuredC);
      const candidate: Record<string, unknown> = {
        stage,
        startedAt,
        plannedMinutes: plannedMinutes === 0 ? null : plannedMinutes,
        notes: v.notes.trim() === '' ? null : v.notes.trim(),
        readings: v.readings
          .filter((r) => r.gaugeValue.trim() !== '')
          .map((r, i) => ({ at: when(`readings.${i}.at`, r.at, true), gaugeValue: number(`readings.${i}.gaugeValue`, r.gaugeValue), gaugeUnit: r.gaugeUnit })),
      };
      if (end) candidate.endedAt = endedAt;
      if (stage === 'vacuum') candidate.bubblingStoppedAt = when('bubblingStoppedAt', v.bubblingStoppedAt, false);
      if (hasOven(stage)) {
        candidate.ovenSetC = set === null ? null : units.fromDisplay(set, 'temperature');
        candidate.ovenMeasuredC = measured === null ? null : units.fromDisplay(measured, 'temperature');
      }
      if (bad.length) {
        for (const [f, msg] of bad) form.setError(f, { message: msg });
        return;
      }
      const parsed = recordStageSchema.safeParse(candidate);
      if (!parsed.success) {
        placeIssues(parsed.error.issues, form.setError);
        return;
      }
      try {
        await record.mutateAsync(parsed.data as RecordStageInput);
        form.setValue('readings', []);
        // The form may go away with the change (an ended stage has none), so the page says what happened.
        onSaved(mode === 'start' ? `${label} started.` : end ? `${label} ended.` : `${label} saved.`);
      } catch (err) {
        applyServerErrors(err, (name, e) => form.setError(formField(String(name)), e), [
          'stage',
          'startedAt',
          'endedAt',
          'plannedMinutes',
          'bubblingStoppedAt',
          'ovenSetC',
          'ovenMeasuredC',
          'notes',
          ...v.readings.flatMap((_, i) => [`readings.${i}.at`, `readings.${i}.gaugeValue`, `readings.${i}.gaugeUnit`]),
        ]);
      }
    });

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
          <Input id={`${idp}-start`} label={`${label} started at`} name="startedAt" register={form.register} type="datetime-local" error={errors.startedAt?.message} />
        ) : (
          <Input id={`${idp}-end`} label={`${label} ended at`} name="endedAt" register={form.register} type="datetime-local" error={errors.endedAt?.message} hint="Used only by the “End” button." />
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
              {...form.register('plannedHours')}
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
              {...form.register('plannedMins')}
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
          <p className="mb-2 text-xs text-ink-faint">{GAUGE_NOTE}</p>
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
                    <input id={`${idp}-r${i}-at`} type="datetime-local" className="field-input" aria-invalid={e?.at ? true : undefined} aria-describedby={e?.at ? `${idp}-r${i}-at-error` : undefined} {...form.register(`readings.${i}.at`)} />
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
                      {...form.register(`readings.${i}.gaugeValue`)}
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
                    {w && <ReadingPreview value={w.gaugeValue} unit={w.gaugeUnit} altitudeM={run.altitudeM} />}
                  </p>
                  <button type="button" className="btn-quiet mb-1" onClick={() => readings.remove(i)}>
                    Remove<span className="sr-only"> reading {i + 1}</span>
                  </button>
                </li>
              );
            })}
          </ol>
          <button type="button" className="btn-quiet mt-2" onClick={() => readings.append({ at: toLocalInput(new Date()), gaugeValue: '', gaugeUnit: watched.at(-1)?.gaugeUnit ?? defaultUnit })}>
            Add a gauge reading
          </button>
          <div className="mt-3 max-w-xs">
            <Input id={`${idp}-bubbles`} label="Bubbling stopped at (optional)" name="bubblingStoppedAt" register={form.register} type="datetime-local" error={errors.bubblingStoppedAt?.message} />
          </div>
        </fieldset>
      )}

      {hasOven(stage) && (
        <div className="grid gap-x-4 sm:grid-cols-2">
          <Input id={`${idp}-set`} label={`Oven set point (${tempUnit})`} name="ovenSetC" register={form.register} inputMode="decimal" error={errors.ovenSetC?.message} />
          <Input
            id={`${idp}-meas`}
            label={`Separate thermometer in the oven (${tempUnit})`}
            name="ovenMeasuredC"
            register={form.register}
            inputMode="decimal"
            error={errors.ovenMeasuredC?.message}
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
