import { useId, useMemo, useState, type ReactNode } from 'react';
import { useForm, type DefaultValues, type FieldValues, type Resolver, type UseFormReturn } from 'react-hook-form';
import { z } from 'zod';
import {
  CHECK_STAGES,
  HARDNESS_SCALES,
  HARDNESS_SCALE_LABELS,
  WEIGHING_STAGES,
  type CheckStage,
  type HardnessScale,
  type WeighingStage,
} from '../../../../shared/constants/records';
import {
  checkInputSchema,
  correctCheckSchema,
  correctWeighingSchema,
  weighingInputSchema,
  type CheckOut,
  type CouponDetail,
  type WeighingOut,
} from '../../../../shared/schemas/coupons';
import { Field, FormError, SelectField, FormActions } from '../../../components/ui/field';
import { NumberField } from '../../../components/ui/number-field';
import { applyServerErrors } from '../../../lib/form-errors';
import { fromLocalInput, toLocalInput } from '../../../lib/format/dates';
import { toBox, toSi, type DisplayUnits } from '../../../lib/forms/number-input';
import { convertingResolver } from '../../../lib/forms/resolver';
import { useUnits } from '../../../lib/use-units';
import { useQuery } from '@tanstack/react-query';
import { weighingWarnings } from '../../../../shared/runs/contradictions';
import { EntryWarnings, useGoOnAnyway } from '../../../components/ui/entry-warnings';
import { runQuery } from '../../../lib/queries/records';
import { useAddCheck, useAddWeighing, useCorrectCheck, useCorrectWeighing } from '../api/use-coupon-mutations';

export const WEIGHING_STAGE_LABELS: Record<WeighingStage, string> = {
  dry: 'Dry',
  soaked: 'Soaked (after the resin soak)',
  cured: 'Cured',
  'wet-test': 'Water-soak test (after)',
  'drying-check': 'Drying check',
};
export const CHECK_STAGE_LABELS: Record<CheckStage, string> = { dry: 'Dry', cured: 'Cured', 'wet-test': 'Water-soak test (after)' };

const checkStageOptions = CHECK_STAGES.map((s) => ({ value: s, label: CHECK_STAGE_LABELS[s] }));
const optionalText = (v: string) => v.trim() || undefined;
const instant = (v: string) => fromLocalInput(v) ?? undefined;
const orUndefined = (v: number | null) => (v === null ? undefined : v);

/**
 * One coupon form: react-hook-form with the converting resolver (display units → SI, the shared contract,
 * messages on the boxes), the server's field errors on the same boxes, and a short note once saved.
 */
function useCouponForm<TForm extends FieldValues, TOut>(defaults: DefaultValues<TForm>, resolver: Resolver<TForm, unknown, TOut>, fields: readonly string[]) {
  const form = useForm<TForm, unknown, TOut>({ defaultValues: defaults, resolver });
  const [done, setDone] = useState<string | null>(null);
  const submit = (
    send: (body: TOut) => Promise<unknown>,
    message: string,
    after?: (form: UseFormReturn<TForm, unknown, TOut>) => void,
    /** False stops the save (a warning not yet confirmed); the form says why itself. */
    mayGoOn: () => boolean = () => true,
  ) =>
    form.handleSubmit(async (body) => {
      setDone(null);
      if (!mayGoOn()) return;
      try {
        await send(body);
        setDone(message);
        after?.(form);
      } catch (err) {
        applyServerErrors(err, form.setError, fields);
      }
    });
  return { form, submit, done };
}

function Done({ text }: { text: string | null }) {
  return (
    <p role="status" className="mt-2 text-sm text-moss">
      {text}
    </p>
  );
}

function Frame({ title, id, children }: { title: string; id?: string; children: ReactNode }) {
  const h = useId();
  return (
    <section aria-labelledby={h} id={id} tabIndex={id ? -1 : undefined} className="rounded border border-rule bg-white/40 p-4 scroll-mt-4">
      <h3 id={h} className="mb-2 font-semibold">
        {title}
      </h3>
      {children}
    </section>
  );
}

interface WeighingValues {
  stage: WeighingStage;
  massG: number | null;
  measuredAt: string;
}

export function WeighingForm({ coupon, initialStage }: { coupon: CouponDetail; initialStage?: WeighingStage }) {
  const units = useUnits();
  const add = useAddWeighing(coupon.id);
  const stages = WEIGHING_STAGES.filter((s) => coupon.role === 'treated' || (s !== 'soaked' && s !== 'cured'));
  const resolver = useMemo(
    () =>
      convertingResolver<WeighingValues, typeof weighingInputSchema>(
        weighingInputSchema,
        (v) => ({ stage: v.stage, massG: orUndefined(toSi(v.massG, 'mass', units)), measuredAt: instant(v.measuredAt) }),
        {},
        { massG: 'Enter the mass' },
      ),
    [units],
  );
  const { form, submit, done } = useCouponForm<WeighingValues, z.output<typeof weighingInputSchema>>(
    { stage: initialStage && stages.includes(initialStage) ? initialStage : 'drying-check', massG: null, measuredAt: toLocalInput() },
    resolver,
    ['stage', 'massG', 'measuredAt'],
  );
  // A weighing the run's recorded stages say cannot have happened yet (a cured weight while the run is
  // still drying) is asked about before it is saved.
  const run = useQuery({ ...runQuery(coupon.runId ?? 0), enabled: coupon.runId !== null });
  const stage = form.watch('stage');
  const measuredAt = form.watch('measuredAt');
  const contradictions = useMemo(() => {
    if (coupon.runId !== null && !run.data) return [];
    return weighingWarnings([
      {
        couponId: coupon.id,
        tag: coupon.tag,
        role: coupon.role,
        stage,
        measuredAt: instant(measuredAt) ?? new Date().toISOString(),
        run: run.data ? { code: run.data.code, stages: run.data.stages } : null,
      },
    ]);
  }, [coupon.id, coupon.tag, coupon.role, coupon.runId, run.data, stage, measuredAt]);
  const gate = useGoOnAnyway(contradictions);
  const onSubmit = submit(
    (body) => add.mutateAsync(body),
    'Weighing saved.',
    (f) => f.reset({ ...f.getValues(), massG: null }),
    gate.mayGoOn,
  );
  return (
    <Frame title="Add a weighing" id="weighing-form">
      <form noValidate aria-label="Add a weighing" onSubmit={(e) => void onSubmit(e)}>
        <FormError message={form.formState.errors.root?.message} />
        <div className="grid gap-x-3 sm:grid-cols-3">
          <SelectField
            label="Stage"
            registration={form.register('stage')}
            error={form.formState.errors.stage?.message}
            options={stages.map((s) => ({ value: s, label: WEIGHING_STAGE_LABELS[s] }))}
          />
          <NumberField form={form} name="massG" label="Mass" quantity="mass" />
          <Field label="Weighed at" type="datetime-local" registration={form.register('measuredAt')} error={form.formState.errors.measuredAt?.message} />
        </div>
        <p className="mb-2 text-xs text-ink-faint">
          Drying checks can be added as often as needed; the other stages take one weighing each, corrected below with a reason.
        </p>
        <EntryWarnings warnings={contradictions} gate={gate} action="save the weighing" className="mb-3" />
        <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
          Save the weighing
        </button>
        <Done text={done} />
      </form>
    </Frame>
  );
}

interface DimensionValues {
  stage: CheckStage;
  lengthMm: number | null;
  widthMm: number | null;
  thicknessMm: number | null;
  volumeCm3: number | null;
  method: string;
  measuredAt: string;
}
const DIMENSION_FIELDS = ['stage', 'lengthMm', 'widthMm', 'thicknessMm', 'volumeCm3', 'method', 'measuredAt'] as const;

/** The dimension check the contract takes, from boxes in the user's length and volume units. */
function dimensionCheck(v: Omit<DimensionValues, 'method'> & { method?: string }, units: ReturnType<typeof useUnits>) {
  return {
    kind: 'dimension' as const,
    stage: v.stage,
    measuredAt: instant(v.measuredAt),
    lengthMm: orUndefined(toSi(v.lengthMm, 'length', units)),
    widthMm: orUndefined(toSi(v.widthMm, 'length', units)),
    thicknessMm: orUndefined(toSi(v.thicknessMm, 'length', units)),
    volumeCm3: orUndefined(toSi(v.volumeCm3, 'volume', units)),
    method: optionalText(v.method ?? ''),
  };
}

export function DimensionForm({ coupon, stage, title }: { coupon: CouponDetail; stage?: CheckStage; title?: string }) {
  const units = useUnits();
  const add = useAddCheck(coupon.id);
  const resolver = useMemo(() => convertingResolver<DimensionValues, typeof checkInputSchema>(checkInputSchema, (v) => dimensionCheck(v, units)), [units]);
  const { form, submit, done } = useCouponForm<DimensionValues, z.output<typeof checkInputSchema>>(
    { stage: stage ?? 'dry', lengthMm: null, widthMm: null, thicknessMm: null, volumeCm3: null, method: '', measuredAt: toLocalInput() },
    resolver,
    DIMENSION_FIELDS,
  );
  const onSubmit = submit((body) => add.mutateAsync(body), 'Dimensions saved.');
  const label = title ?? 'Add a dimension check';
  return (
    <Frame title={label}>
      <form noValidate aria-label={label} onSubmit={(e) => void onSubmit(e)}>
        <FormError message={form.formState.errors.root?.message} />
        <div className="grid gap-x-3 sm:grid-cols-3">
          {stage ? null : (
            <SelectField label="Stage" registration={form.register('stage')} error={form.formState.errors.stage?.message} options={checkStageOptions} />
          )}
          <NumberField form={form} name="lengthMm" label="Length" quantity="length" />
          <NumberField form={form} name="widthMm" label="Width" quantity="length" />
          <NumberField form={form} name="thicknessMm" label="Thickness" quantity="length" />
          <NumberField form={form} name="volumeCm3" label="Or volume by immersion" quantity="volume" hint="For pieces calipers cannot measure." />
          <Field label="Method (optional)" registration={form.register('method')} error={form.formState.errors.method?.message} />
          <Field label="Measured at" type="datetime-local" registration={form.register('measuredAt')} error={form.formState.errors.measuredAt?.message} />
        </div>
        <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
          Save the dimensions
        </button>
        <Done text={done} />
      </form>
    </Frame>
  );
}

interface HardnessValues {
  stage: CheckStage;
  hardnessValue: number | null;
  hardnessScale: HardnessScale;
  method: string;
  measuredAt: string;
}

/** Janka is a force, typed in the user's force unit and stored in N; Shore D and Brinell are scales, kept as read. */
const hardnessToSi = (value: number | null, scale: HardnessScale | null, units: DisplayUnits) => (scale === 'janka-n' ? toSi(value, 'force', units) : value);

/** The scale's name with the unit a Janka reading is typed in: "Janka (lbf)" for a user who reads force in lbf. */
export function hardnessScaleLabel(scale: HardnessScale, units: { label: (q: 'force') => string }): string {
  return scale === 'janka-n' ? `Janka (${units.label('force')})` : HARDNESS_SCALE_LABELS[scale];
}

const hardnessResolverFor = (units: DisplayUnits) =>
  convertingResolver<HardnessValues, typeof checkInputSchema>(
    checkInputSchema,
    (v) => ({
      kind: 'hardness',
      stage: v.stage,
      hardnessValue: orUndefined(hardnessToSi(v.hardnessValue, v.hardnessScale, units)),
      hardnessScale: v.hardnessScale,
      measuredAt: instant(v.measuredAt),
      method: optionalText(v.method),
    }),
    {},
    { hardnessValue: 'Enter the reading' },
  );

export function HardnessForm({ coupon }: { coupon: CouponDetail }) {
  const units = useUnits();
  const add = useAddCheck(coupon.id);
  const hardnessResolver = useMemo(() => hardnessResolverFor(units), [units]);
  const { form, submit, done } = useCouponForm<HardnessValues, z.output<typeof checkInputSchema>>(
    { stage: coupon.role === 'treated' ? 'cured' : 'dry', hardnessValue: null, hardnessScale: 'shore-d', method: '', measuredAt: toLocalInput() },
    hardnessResolver,
    ['stage', 'hardnessValue', 'hardnessScale', 'method', 'measuredAt'],
  );
  const onSubmit = submit(
    (body) => add.mutateAsync(body),
    'Hardness saved.',
    (f) => f.reset({ ...f.getValues(), hardnessValue: null }),
  );
  const { errors } = form.formState;
  return (
    <Frame title="Add a hardness reading">
      <form noValidate aria-label="Add a hardness reading" onSubmit={(e) => void onSubmit(e)}>
        <FormError message={errors.root?.message} />
        <div className="grid gap-x-3 sm:grid-cols-3">
          <SelectField label="Stage" registration={form.register('stage')} error={errors.stage?.message} options={checkStageOptions} />
          <NumberField form={form} name="hardnessValue" label="Reading" />
          <SelectField
            label="Scale"
            registration={form.register('hardnessScale')}
            error={errors.hardnessScale?.message}
            options={HARDNESS_SCALES.map((s) => ({ value: s, label: hardnessScaleLabel(s, units) }))}
          />
          <Field label="Method (optional)" registration={form.register('method')} error={errors.method?.message} />
          <Field label="Measured at" type="datetime-local" registration={form.register('measuredAt')} error={errors.measuredAt?.message} />
        </div>
        <p className="mb-2 text-xs text-ink-faint">
          Shore D, Janka and Brinell are different tests: each reading stays on the scale it was taken in and is never converted.
        </p>
        <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
          Save the reading
        </button>
        <Done text={done} />
      </form>
    </Frame>
  );
}

interface MoistureValues {
  stage: CheckStage;
  moisturePct: number | null;
  method: string;
  measuredAt: string;
}

const moistureResolver = convertingResolver<MoistureValues, typeof checkInputSchema>(
  checkInputSchema,
  (v) => ({ kind: 'moisture', stage: v.stage, moisturePct: orUndefined(v.moisturePct), measuredAt: instant(v.measuredAt), method: optionalText(v.method) }),
  {},
  { moisturePct: 'Enter the moisture content' },
);

export function MoistureForm({ coupon }: { coupon: CouponDetail }) {
  const add = useAddCheck(coupon.id);
  const { form, submit, done } = useCouponForm<MoistureValues, z.output<typeof checkInputSchema>>(
    { stage: 'dry', moisturePct: null, method: '', measuredAt: toLocalInput() },
    moistureResolver,
    ['stage', 'moisturePct', 'method', 'measuredAt'],
  );
  const onSubmit = submit(
    (body) => add.mutateAsync(body),
    'Moisture saved.',
    (f) => f.reset({ ...f.getValues(), moisturePct: null }),
  );
  const { errors } = form.formState;
  return (
    <Frame title="Add a moisture reading">
      <form noValidate aria-label="Add a moisture reading" onSubmit={(e) => void onSubmit(e)}>
        <FormError message={errors.root?.message} />
        <div className="grid gap-x-3 sm:grid-cols-3">
          <SelectField label="Stage" registration={form.register('stage')} error={errors.stage?.message} options={checkStageOptions} />
          <NumberField form={form} name="moisturePct" label="Moisture content" unit="%, oven-dry basis" />
          <Field label="Method (optional)" registration={form.register('method')} error={errors.method?.message} hint="e.g. pin meter, oven-dry" />
          <Field label="Measured at" type="datetime-local" registration={form.register('measuredAt')} error={errors.measuredAt?.message} />
        </div>
        <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
          Save the reading
        </button>
        <Done text={done} />
      </form>
    </Frame>
  );
}

interface SoakValues {
  massG: number | null;
  lengthMm: number | null;
  widthMm: number | null;
  thicknessMm: number | null;
  volumeCm3: number | null;
  measuredAt: string;
}

/** The soak test is two records (a weighing and a size check), each checked by its own contract. */
const soakTestSchema = z
  .strictObject({ weighing: weighingInputSchema.nullable(), check: checkInputSchema.nullable() })
  .refine((v) => v.weighing !== null || v.check !== null, { message: 'Enter the mass after the soak, or the size after it', path: ['weighing'] });
const SOAK_RENAMES = {
  weighing: 'massG',
  'weighing.massG': 'massG',
  'weighing.measuredAt': 'measuredAt',
  'check.lengthMm': 'lengthMm',
  'check.widthMm': 'widthMm',
  'check.thicknessMm': 'thicknessMm',
  'check.volumeCm3': 'volumeCm3',
  'check.measuredAt': 'measuredAt',
  check: 'lengthMm',
};

/** Water-soak stability: the after-soak mass, and the after-soak size or volume when measured. */
export function SoakTestForm({ coupon }: { coupon: CouponDetail }) {
  const units = useUnits();
  const addW = useAddWeighing(coupon.id);
  const addC = useAddCheck(coupon.id);
  const hasMass = coupon.weighings.some((w) => w.stage === 'wet-test');
  const hasSize = coupon.checks.some((c) => c.kind === 'dimension' && c.stage === 'wet-test');
  const resolver = useMemo(
    () =>
      convertingResolver<SoakValues, typeof soakTestSchema>(
        soakTestSchema,
        (v) => {
          const check = dimensionCheck({ stage: 'wet-test', ...v }, units);
          const anySize = [v.lengthMm, v.widthMm, v.thicknessMm, v.volumeCm3].some((x) => x !== null);
          return {
            weighing: v.massG === null || hasMass ? null : { stage: 'wet-test', massG: toSi(v.massG, 'mass', units), measuredAt: instant(v.measuredAt) },
            check: !anySize || hasSize ? null : check,
          };
        },
        SOAK_RENAMES,
      ),
    [units, hasMass, hasSize],
  );
  const { form, submit, done } = useCouponForm<SoakValues, z.output<typeof soakTestSchema>>(
    { massG: null, lengthMm: null, widthMm: null, thicknessMm: null, volumeCm3: null, measuredAt: toLocalInput() },
    resolver,
    ['massG', 'lengthMm', 'widthMm', 'thicknessMm', 'volumeCm3', 'measuredAt'],
  );
  const onSubmit = submit(
    async ({ weighing, check }) => {
      if (weighing) await addW.mutateAsync(weighing);
      if (check) await addC.mutateAsync(check);
    },
    'Soak test saved.',
    (f) => f.reset({ ...f.getValues(), massG: null, lengthMm: null, widthMm: null, thicknessMm: null, volumeCm3: null }),
  );
  const base = coupon.role === 'treated' ? 'cured' : 'dry';
  const baseMass = coupon.role === 'treated' ? coupon.metrics.curedMassG : coupon.metrics.dryMassG;
  const baseVol = coupon.role === 'treated' ? coupon.metrics.curedVolumeCm3 : coupon.metrics.dryVolumeCm3;
  return (
    <Frame title="Water-soak stability test">
      <p className="mb-2 text-sm text-ink-soft">
        A short soak (about an hour under water, an hour to drain; common practice, no published source) and a reweigh. Swelling is worked out from the {base}{' '}
        state
        {baseMass !== null ? ` (${units.format(baseMass, 'mass')}` : ' (no mass yet'}
        {baseVol !== null ? `, ${units.format(baseVol, 'volume')})` : ')'}
        {coupon.role === 'treated' ? '; ASE compares it with the untreated controls of the same species in the trial.' : '.'}
      </p>
      <form noValidate aria-label="Water-soak stability test" onSubmit={(e) => void onSubmit(e)}>
        <FormError message={form.formState.errors.root?.message} />
        <div className="grid gap-x-3 sm:grid-cols-3">
          {!hasMass && <NumberField form={form} name="massG" label="Mass after the soak" quantity="mass" />}
          {!hasSize && (
            <>
              <NumberField form={form} name="lengthMm" label="Length after" quantity="length" />
              <NumberField form={form} name="widthMm" label="Width after" quantity="length" />
              <NumberField form={form} name="thicknessMm" label="Thickness after" quantity="length" />
              <NumberField form={form} name="volumeCm3" label="Or volume after, by immersion" quantity="volume" />
            </>
          )}
          {!(hasMass && hasSize) && (
            <Field label="Measured at" type="datetime-local" registration={form.register('measuredAt')} error={form.formState.errors.measuredAt?.message} />
          )}
        </div>
        {hasMass && hasSize ? (
          <p className="text-sm text-ink-soft">The after-soak mass and size are both recorded; correct them in the readings above if needed.</p>
        ) : (
          <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
            Save the soak test
          </button>
        )}
        <Done text={done} />
      </form>
    </Frame>
  );
}

interface CorrectWeighingValues {
  massG: number | null;
  reason: string;
}

/** A correction supersedes the reading; the old value stays in the history with the reason. */
export function CorrectWeighingForm({ weighing, onDone }: { weighing: WeighingOut; onDone: () => void }) {
  const units = useUnits();
  const correct = useCorrectWeighing();
  const resolver = useMemo(
    () =>
      convertingResolver<CorrectWeighingValues, typeof correctWeighingSchema>(
        correctWeighingSchema,
        (v) => ({ massG: orUndefined(toSi(v.massG, 'mass', units)), reason: v.reason }),
        {},
        { massG: 'Enter the corrected mass' },
      ),
    [units],
  );
  const { form, submit } = useCouponForm<CorrectWeighingValues, z.output<typeof correctWeighingSchema>>(
    { massG: toBox(weighing.massG, 'mass', units), reason: '' },
    resolver,
    ['massG', 'reason'],
  );
  const onSubmit = submit((body) => correct.mutateAsync({ id: weighing.id, ...body }), 'Corrected.', onDone);
  return (
    <form
      noValidate
      aria-label={`Correct the ${weighing.stage} weighing`}
      onSubmit={(e) => void onSubmit(e)}
      className="mt-2 rounded border border-rule bg-white/50 p-3"
    >
      <FormError message={form.formState.errors.root?.message} />
      <div className="grid gap-x-3 sm:grid-cols-2">
        <NumberField form={form} name="massG" label="Corrected mass" quantity="mass" />
        <Field
          label="Reason for the correction"
          registration={form.register('reason')}
          error={form.formState.errors.reason?.message}
          hint="Kept in the history beside the old value."
        />
      </div>
      <FormActions submitLabel="Save the correction" busy={form.formState.isSubmitting} onCancel={onDone} />
    </form>
  );
}

interface CorrectCheckValues {
  lengthMm: number | null;
  widthMm: number | null;
  thicknessMm: number | null;
  volumeCm3: number | null;
  hardnessValue: number | null;
  moisturePct: number | null;
  reason: string;
}

export function CorrectCheckForm({ check, onDone }: { check: CheckOut; onDone: () => void }) {
  const units = useUnits();
  const correct = useCorrectCheck();
  const initial: CorrectCheckValues = useMemo(
    () => ({
      lengthMm: toBox(check.lengthMm, 'length', units),
      widthMm: toBox(check.widthMm, 'length', units),
      thicknessMm: toBox(check.thicknessMm, 'length', units),
      volumeCm3: toBox(check.volumeCm3, 'volume', units),
      hardnessValue: check.hardnessScale === 'janka-n' ? toBox(check.hardnessValue, 'force', units) : check.hardnessValue,
      moisturePct: check.moisturePct,
      reason: '',
    }),
    [check, units],
  );
  const resolver = useMemo(
    () =>
      convertingResolver<CorrectCheckValues, typeof correctCheckSchema>(correctCheckSchema, (v) => {
        // Only what was changed is sent, so an untouched value is not nudged by a round trip through the display unit.
        const changed = <K extends keyof CorrectCheckValues>(f: K) => (Object.is(v[f], initial[f]) ? undefined : v[f]);
        const si = (f: 'lengthMm' | 'widthMm' | 'thicknessMm' | 'volumeCm3', q: 'length' | 'volume') => {
          const x = changed(f);
          return x === undefined ? undefined : orUndefined(toSi(x, q, units));
        };
        if (check.kind === 'dimension')
          return {
            lengthMm: si('lengthMm', 'length'),
            widthMm: si('widthMm', 'length'),
            thicknessMm: si('thicknessMm', 'length'),
            volumeCm3: si('volumeCm3', 'volume'),
            reason: v.reason,
          };
        if (check.kind === 'hardness')
          return { hardnessValue: orUndefined(hardnessToSi(changed('hardnessValue') ?? null, check.hardnessScale, units)), reason: v.reason };
        return { moisturePct: orUndefined(changed('moisturePct') ?? null), reason: v.reason };
      }),
    [check.kind, check.hardnessScale, initial, units],
  );
  const { form, submit } = useCouponForm<CorrectCheckValues, z.output<typeof correctCheckSchema>>(initial, resolver, [
    'lengthMm',
    'widthMm',
    'thicknessMm',
    'volumeCm3',
    'hardnessValue',
    'moisturePct',
    'reason',
  ]);
  const onSubmit = submit((body) => correct.mutateAsync({ id: check.id, ...body }), 'Corrected.', onDone);
  return (
    <form
      noValidate
      aria-label={`Correct the ${check.kind} check`}
      onSubmit={(e) => void onSubmit(e)}
      className="mt-2 rounded border border-rule bg-white/50 p-3"
    >
      <FormError message={form.formState.errors.root?.message} />
      <div className="grid gap-x-3 sm:grid-cols-3">
        {check.kind === 'dimension' && (
          <>
            <NumberField form={form} name="lengthMm" label="Length" quantity="length" />
            <NumberField form={form} name="widthMm" label="Width" quantity="length" />
            <NumberField form={form} name="thicknessMm" label="Thickness" quantity="length" />
            <NumberField form={form} name="volumeCm3" label="Volume" quantity="volume" />
          </>
        )}
        {check.kind === 'hardness' && (
          <NumberField form={form} name="hardnessValue" label="Reading" unit={check.hardnessScale ? hardnessScaleLabel(check.hardnessScale, units) : 'scale'} />
        )}
        {check.kind === 'moisture' && <NumberField form={form} name="moisturePct" label="Moisture content" unit="%" />}
        <div className="sm:col-span-2">
          <Field
            label="Reason for the correction"
            registration={form.register('reason')}
            error={form.formState.errors.reason?.message}
            hint="Kept in the history beside the old value."
          />
        </div>
      </div>
      <FormActions submitLabel="Save the correction" busy={form.formState.isSubmitting} onCancel={onDone} />
    </form>
  );
}
