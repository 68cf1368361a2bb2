import { useId } from 'react';
import { useFieldArray, useForm } from 'react-hook-form';
import { GAUGE_UNITS, type GaugeUnit } from '../../../../shared/constants/records';
import { correctStageSchema, type CorrectStageInput, type RunDetail, type RunStageOut } from '../../../../shared/schemas/runs';
import { STAGE_LABELS } from '../../../../shared/runs/stages';
import { FormError, FormActions } from '../../../components/ui/field';
import { applyServerErrors } from '../../../lib/form-errors';
import { useUnits } from '../../../lib/use-units';
import { useCorrectStage } from '../api/use-correct-stage';
import { fromLocalInput, toLocalInput } from '../../../lib/format/dates';

interface ReadingRow {
  id: number;
  at: string;
  gaugeValue: string;
  gaugeUnit: GaugeUnit;
  remove: boolean;
}
interface NewReading {
  at: string;
  gaugeValue: string;
  gaugeUnit: GaugeUnit;
}
interface Values {
  startedAt: string;
  endedAt: string;
  bubblingStoppedAt: string;
  barometer: string;
  ovenSetC: string;
  ovenMeasuredC: string;
  notes: string;
  readings: ReadingRow[];
  added: NewReading[];
  reason: string;
}

const num = (s: string): number | null => {
  const t = s.trim().replace(',', '.');
  if (t === '') return null;
  const n = Number(t);
  return Number.isFinite(n) ? n : Number.NaN;
};
const hasOven = (s: RunStageOut['stage']) => s === 'drying' || s === 'cure';

/**
 * Corrects what was recorded for a stage: its times, bubbling, oven temperatures, notes and gauge
 * readings, with the reason. Only what the user changed is sent; the version it replaces stays in
 * the run's history.
 */
export function CorrectStageForm({
  run,
  stage,
  onDone,
  onCancel,
}: {
  run: RunDetail;
  stage: RunStageOut;
  onDone: (message: string) => void;
  onCancel: () => void;
}) {
  const units = useUnits();
  const correct = useCorrectStage(run.id, stage.stage);
  const idp = useId();
  const temp = (c: number | null) => (c === null ? '' : units.toDisplay(c, 'temperature').toFixed(1));
  const initial: Values = {
    startedAt: toLocalInput(stage.startedAt),
    endedAt: stage.endedAt ? toLocalInput(stage.endedAt) : '',
    bubblingStoppedAt: stage.bubblingStoppedAt ? toLocalInput(stage.bubblingStoppedAt) : '',
    barometer: stage.barometerKpa === null ? '' : String(Number(units.toDisplay(stage.barometerKpa, 'pressure').toPrecision(10))),
    ovenSetC: temp(stage.ovenSetC),
    ovenMeasuredC: temp(stage.ovenMeasuredC),
    notes: stage.notes ?? '',
    readings: stage.readings.map((r) => ({ id: r.id, at: toLocalInput(r.at), gaugeValue: String(r.gaugeValue), gaugeUnit: r.gaugeUnit, remove: false })),
    added: [],
    reason: '',
  };
  const form = useForm<Values>({ defaultValues: initial });
  const added = useFieldArray({ control: form.control, name: 'added' });
  const { errors } = form.formState;
  const label = STAGE_LABELS[stage.stage];
  const tempUnit = units.label('temperature');

  const onSubmit = form.handleSubmit(async (v) => {
    const body: Record<string, unknown> = { reason: v.reason.trim() };
    const bad: [string, string][] = [];
    const time = (field: keyof Values, required: boolean) => {
      if (v[field] === initial[field]) return;
      const s = v[field] as string;
      if (s === '' && !required) body[field] = null;
      else {
        const iso = fromLocalInput(s);
        if (!iso) bad.push([field, 'Enter a date and time']);
        else body[field] = iso;
      }
    };
    time('startedAt', true);
    time('endedAt', false);
    if (stage.stage === 'vacuum') time('bubblingStoppedAt', false);
    if (stage.stage === 'vacuum' && v.barometer !== initial.barometer) {
      const n = num(v.barometer);
      if (Number.isNaN(n)) bad.push(['barometer', 'Enter a number']);
      else body.barometerKpa = n === null ? null : units.fromDisplay(n, 'pressure');
    }
    if (hasOven(stage.stage)) {
      for (const f of ['ovenSetC', 'ovenMeasuredC'] as const) {
        if (v[f] === initial[f]) continue;
        const n = num(v[f]);
        if (Number.isNaN(n)) bad.push([f, 'Enter a number']);
        else body[f] = n === null ? null : units.fromDisplay(n, 'temperature');
      }
    }
    if (v.notes !== initial.notes) body.notes = v.notes.trim() === '' ? null : v.notes.trim();
    const readingChanges: Record<string, unknown>[] = [];
    v.readings.forEach((r, i) => {
      const was = initial.readings[i]!;
      if (r.remove) return void readingChanges.push({ id: r.id, remove: true });
      const change: Record<string, unknown> = { id: r.id };
      if (r.at !== was.at) {
        const iso = fromLocalInput(r.at);
        if (!iso) bad.push([`readings.${i}.at`, 'Enter a date and time']);
        else change.at = iso;
      }
      if (r.gaugeValue !== was.gaugeValue) {
        const n = num(r.gaugeValue);
        if (n === null || Number.isNaN(n)) bad.push([`readings.${i}.gaugeValue`, 'Enter the gauge reading']);
        else change.gaugeValue = n;
      }
      if (r.gaugeUnit !== was.gaugeUnit) change.gaugeUnit = r.gaugeUnit;
      if (Object.keys(change).length > 1) readingChanges.push(change);
    });
    if (readingChanges.length) body.readings = readingChanges;
    const newOnes = v.added
      .filter((r) => r.gaugeValue.trim() !== '')
      .map((r, i) => {
        const iso = fromLocalInput(r.at);
        const n = num(r.gaugeValue);
        if (!iso) bad.push([`added.${i}.at`, 'Enter a date and time']);
        if (n === null || Number.isNaN(n)) bad.push([`added.${i}.gaugeValue`, 'Enter the gauge reading']);
        return { at: iso, gaugeValue: n, gaugeUnit: r.gaugeUnit };
      });
    if (newOnes.length) body.addReadings = newOnes;
    if (bad.length) {
      for (const [f, message] of bad) form.setError(f as never, { message });
      return;
    }
    const parsed = correctStageSchema.safeParse(body);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const path = issue.path.map(String).join('.');
        form.setError((path === '' ? 'root' : path.replace(/^addReadings/, 'added').replace(/^barometerKpa$/, 'barometer')) as never, {
          message: issue.message,
        });
      }
      return;
    }
    try {
      await correct.mutateAsync(parsed.data as CorrectStageInput);
      onDone(`${label} corrected; the earlier values are kept in the run's history.`);
    } catch (err) {
      applyServerErrors(
        err,
        (name, e) =>
          form.setError(
            String(name)
              .replace(/^addReadings/, 'added')
              .replace(/^barometerKpa$/, 'barometer') as never,
            e,
          ),
        [
          'startedAt',
          'endedAt',
          'bubblingStoppedAt',
          'barometerKpa',
          'ovenSetC',
          'ovenMeasuredC',
          'notes',
          'reason',
          ...v.readings.flatMap((_, i) => [`readings.${i}.id`, `readings.${i}.at`, `readings.${i}.gaugeValue`]),
          ...v.added.flatMap((_, i) => [`added.${i}.at`, `added.${i}.gaugeValue`]),
        ],
      );
    }
  });

  const err = (name: string) => {
    const parts = name.split('.');
    let e: unknown = errors;
    for (const p of parts) e = (e as Record<string, unknown> | undefined)?.[p];
    return (e as { message?: string } | undefined)?.message;
  };
  const field = (name: keyof Values | string, text: string, type = 'text', hint?: string, numeric = false) => {
    const id = `${idp}-${name}`;
    const message = err(name);
    return (
      <div className="mb-3">
        <label htmlFor={id} className="field-label">
          {text}
        </label>
        <input
          id={id}
          type={type}
          className="field-input"
          inputMode={numeric ? 'decimal' : undefined}
          aria-invalid={message ? true : undefined}
          aria-describedby={[hint ? `${id}-hint` : '', message ? `${id}-error` : ''].filter(Boolean).join(' ') || undefined}
          {...form.register(name as never)}
        />
        {hint && (
          <p id={`${id}-hint`} className="mt-1 text-xs text-ink-faint">
            {hint}
          </p>
        )}
        {message && (
          <p id={`${id}-error`} role="alert" className="mt-1 text-sm text-margin">
            {message}
          </p>
        )}
      </div>
    );
  };

  return (
    <form
      noValidate
      onSubmit={(e) => void onSubmit(e)}
      aria-label={`Correct the ${label.toLowerCase()} stage`}
      className="mt-3 rounded border border-amber-ink bg-white/40 p-4"
    >
      <p className="mb-3 text-sm text-ink-soft">Change what was recorded wrongly and say why. The values as they are now stay in the run's history.</p>
      <FormError message={errors.root?.message} />
      <div className="grid gap-x-4 sm:grid-cols-2">
        {field('startedAt', `${label} started at`, 'datetime-local')}
        {field('endedAt', `${label} ended at`, 'datetime-local', stage.endedAt ? undefined : 'Not ended yet; leave empty.')}
        {stage.stage === 'vacuum' && field('bubblingStoppedAt', 'Bubbling stopped at', 'datetime-local')}
        {stage.stage === 'vacuum' &&
          field(
            'barometer',
            `Shop barometer (${units.label('pressure')})`,
            'text',
            'Station pressure while the gauge was read; changing it works every reading of the stage out again.',
            true,
          )}
        {hasOven(stage.stage) && field('ovenSetC', `Oven set point (${tempUnit})`, 'text', undefined, true)}
        {hasOven(stage.stage) && field('ovenMeasuredC', `Thermometer in the oven (${tempUnit})`, 'text', undefined, true)}
      </div>
      {stage.stage === 'vacuum' && (
        <fieldset className="mb-3">
          <legend className="field-label">Gauge readings</legend>
          {initial.readings.length === 0 && <p className="text-sm text-ink-soft">None recorded.</p>}
          {initial.readings.map((r, i) => (
            <div key={r.id} className="mb-2 grid gap-x-3 sm:grid-cols-[1fr_1fr_auto_auto] sm:items-end">
              {field(`readings.${i}.at`, `Reading ${i + 1}: time`, 'datetime-local')}
              {field(`readings.${i}.gaugeValue`, `Reading ${i + 1}: gauge showed`, 'text', undefined, true)}
              <div className="mb-3">
                <label htmlFor={`${idp}-ru-${i}`} className="field-label">
                  Unit
                </label>
                <select id={`${idp}-ru-${i}`} className="field-input" {...form.register(`readings.${i}.gaugeUnit`)}>
                  {GAUGE_UNITS.map((u) => (
                    <option key={u} value={u}>
                      {u}
                    </option>
                  ))}
                </select>
              </div>
              <label className="mb-4 flex items-center gap-2 text-sm">
                <input type="checkbox" {...form.register(`readings.${i}.remove`)} /> Take back
              </label>
            </div>
          ))}
          {added.fields.map((f, i) => (
            <div key={f.id} className="mb-2 grid gap-x-3 sm:grid-cols-[1fr_1fr_auto]">
              {field(`added.${i}.at`, `Added reading ${i + 1}: time`, 'datetime-local')}
              {field(`added.${i}.gaugeValue`, `Added reading ${i + 1}: gauge showed`, 'text', undefined, true)}
              <div className="mb-3">
                <label htmlFor={`${idp}-au-${i}`} className="field-label">
                  Unit
                </label>
                <select id={`${idp}-au-${i}`} className="field-input" {...form.register(`added.${i}.gaugeUnit`)}>
                  {GAUGE_UNITS.map((u) => (
                    <option key={u} value={u}>
                      {u}
                    </option>
                  ))}
                </select>
              </div>
            </div>
          ))}
          <button
            type="button"
            className="btn-quiet"
            onClick={() => added.append({ at: toLocalInput(stage.startedAt), gaugeValue: '', gaugeUnit: units.unit('pressure') === 'inHg' ? 'inHg' : 'kPa' })}
          >
            Add a missed reading
          </button>
        </fieldset>
      )}
      <div className="mb-3">
        <label htmlFor={`${idp}-notes`} className="field-label">
          Notes
        </label>
        <textarea id={`${idp}-notes`} className="field-input" rows={2} {...form.register('notes')} />
      </div>
      {field('reason', 'Why the record changes (kept with the correction)', 'text')}
      <FormActions submitLabel="Save the correction" busy={form.formState.isSubmitting} onCancel={onCancel} />
    </form>
  );
}
