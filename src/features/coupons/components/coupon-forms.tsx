import { useId, useState, type ReactNode } from 'react';
import { useForm, type FieldValues, type Path, type UseFormReturn } from 'react-hook-form';
import type { z } from 'zod';
import { CHECK_STAGES, HARDNESS_SCALES, HARDNESS_SCALE_LABELS, WEIGHING_STAGES, type CheckStage, type HardnessScale, type WeighingStage } from '../../../../shared/constants/records';
import { checkInputSchema, correctCheckSchema, correctWeighingSchema, weighingInputSchema, type CheckOut, type CouponDetail, type WeighingOut } from '../../../../shared/schemas/coupons';
import { FormError } from '../../../components/ui/field';
import { applyServerErrors } from '../../../lib/form-errors';
import { useUnits } from '../../../lib/use-units';
import { useAddCheck, useAddWeighing, useCorrectCheck, useCorrectWeighing } from '../api/use-coupon-mutations';
import { parseTyped } from './grid-model';

export const WEIGHING_STAGE_LABELS: Record<WeighingStage, string> = {
  dry: 'Dry',
  soaked: 'Soaked (after the resin soak)',
  cured: 'Cured',
  'wet-test': 'Water-soak test (after)',
  'drying-check': 'Drying check',
};
export const CHECK_STAGE_LABELS: Record<CheckStage, string> = { dry: 'Dry', cured: 'Cured', 'wet-test': 'Water-soak test (after)' };

function localNow(): string {
  const d = new Date();
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}
function isoFromLocal(v: string): string | undefined {
  const t = new Date(v).getTime();
  return v && Number.isFinite(t) ? new Date(t).toISOString() : undefined;
}

type Form<T extends FieldValues> = UseFormReturn<T>;

/** A text input bound to a form field, labelled, with its error tied by aria-describedby. */
function Input<T extends FieldValues>({ form, name, label, hint, type = 'text', inputMode, className }: { form: Form<T>; name: Path<T>; label: string; hint?: string; type?: string; inputMode?: 'decimal'; className?: string }) {
  const id = useId();
  const error = form.formState.errors[name]?.message as string | undefined;
  const describedBy = [hint ? `${id}-hint` : '', error ? `${id}-err` : ''].filter(Boolean).join(' ') || undefined;
  return (
    <div className={`mb-3 ${className ?? ''}`}>
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      <input id={id} type={type} inputMode={inputMode} autoComplete="off" className="field-input" aria-invalid={error ? true : undefined} aria-describedby={describedBy} {...form.register(name)} />
      {hint && (
        <p id={`${id}-hint`} className="mt-1 text-xs text-ink-faint">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-err`} role="alert" className="mt-1 text-sm text-margin">
          {error}
        </p>
      )}
    </div>
  );
}

function Select<T extends FieldValues>({ form, name, label, options }: { form: Form<T>; name: Path<T>; label: string; options: readonly { value: string; label: string }[] }) {
  const id = useId();
  const error = form.formState.errors[name]?.message as string | undefined;
  return (
    <div className="mb-3">
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      <select id={id} className="field-input" aria-invalid={error ? true : undefined} aria-describedby={error ? `${id}-err` : undefined} {...form.register(name)}>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      {error && (
        <p id={`${id}-err`} role="alert" className="mt-1 text-sm text-margin">
          {error}
        </p>
      )}
    </div>
  );
}

/**
 * The form's numbers are typed in display units; they are converted to SI, checked against the same
 * contract the server applies, and the contract's or the server's messages land on the fields.
 */
function useContractForm<T extends FieldValues, S extends z.ZodType>(defaults: T, schema: S, toBody: (v: T, bad: (f: Path<T>, m: string) => void) => unknown, send: (body: z.infer<S>) => Promise<unknown>) {
  const form = useForm<T>({ defaultValues: defaults as never });
  const [done, setDone] = useState<string | null>(null);
  const fields = Object.keys(defaults);
  const submit = (message: string, after?: () => void) =>
    form.handleSubmit(async (v) => {
      setDone(null);
      let failed = false;
      const body = toBody(v as T, (f, m) => {
        failed = true;
        form.setError(f, { message: m });
      });
      if (failed) return;
      const parsed = schema.safeParse(body);
      if (!parsed.success) {
        for (const i of parsed.error.issues) {
          const f = String(i.path[0] ?? '');
          form.setError((fields.includes(f) ? f : 'root') as Path<T>, { message: i.message });
        }
        return;
      }
      try {
        await send(parsed.data);
        setDone(message);
        after?.();
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

const numberOf = (text: string, field: string, bad: (f: never, m: string) => void): number | undefined => {
  const n = parseTyped(text);
  if (n === null) return undefined;
  if (Number.isNaN(n)) {
    bad(field as never, 'Enter a number');
    return undefined;
  }
  return n;
};

export function WeighingForm({ coupon, initialStage }: { coupon: CouponDetail; initialStage?: WeighingStage }) {
  const units = useUnits();
  const add = useAddWeighing(coupon.id);
  const stages = WEIGHING_STAGES.filter((s) => coupon.role === 'treated' || (s !== 'soaked' && s !== 'cured'));
  const { form, submit, done } = useContractForm(
    { stage: initialStage && stages.includes(initialStage) ? initialStage : 'drying-check', massG: '', measuredAt: localNow() } as { stage: WeighingStage; massG: string; measuredAt: string },
    weighingInputSchema,
    (v, bad) => {
      const n = numberOf(v.massG, 'massG', bad);
      if (n === undefined && !v.massG.trim()) bad('massG', 'Enter the mass');
      return { stage: v.stage, massG: n === undefined ? undefined : units.fromDisplay(n, 'mass'), measuredAt: isoFromLocal(v.measuredAt) };
    },
    (body) => add.mutateAsync(body),
  );
  return (
    <Frame title="Add a weighing" id="weighing-form">
      <form noValidate aria-label="Add a weighing" onSubmit={(e) => void submit('Weighing saved.', () => form.reset({ ...form.getValues(), massG: '' }))(e)}>
        <FormError message={form.formState.errors.root?.message} />
        <div className="grid gap-x-3 sm:grid-cols-3">
          <Select form={form} name="stage" label="Stage" options={stages.map((s) => ({ value: s, label: WEIGHING_STAGE_LABELS[s] }))} />
          <Input form={form} name="massG" label={`Mass (${units.label('mass')})`} inputMode="decimal" />
          <Input form={form} name="measuredAt" label="Weighed at" type="datetime-local" />
        </div>
        <p className="mb-2 text-xs text-ink-faint">Drying checks can be added as often as needed; the other stages take one weighing each, corrected below with a reason.</p>
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
  lengthMm: string;
  widthMm: string;
  thicknessMm: string;
  volumeCm3: string;
  method: string;
  measuredAt: string;
}

function dimensionBody(v: DimensionValues, units: ReturnType<typeof useUnits>, bad: (f: keyof DimensionValues, m: string) => void) {
  const len = (f: 'lengthMm' | 'widthMm' | 'thicknessMm') => {
    const n = numberOf(v[f], f, bad as never);
    return n === undefined ? undefined : units.fromDisplay(n, 'length');
  };
  const vol = numberOf(v.volumeCm3, 'volumeCm3', bad as never);
  return {
    kind: 'dimension' as const,
    stage: v.stage,
    measuredAt: isoFromLocal(v.measuredAt),
    lengthMm: len('lengthMm'),
    widthMm: len('widthMm'),
    thicknessMm: len('thicknessMm'),
    volumeCm3: vol === undefined ? undefined : units.fromDisplay(vol, 'volume'),
    method: v.method.trim() || undefined,
  };
}

export function DimensionForm({ coupon, stage, title }: { coupon: CouponDetail; stage?: CheckStage; title?: string }) {
  const units = useUnits();
  const add = useAddCheck(coupon.id);
  const { form, submit, done } = useContractForm<DimensionValues, typeof checkInputSchema>(
    { stage: stage ?? 'dry', lengthMm: '', widthMm: '', thicknessMm: '', volumeCm3: '', method: '', measuredAt: localNow() },
    checkInputSchema,
    (v, bad) => dimensionBody(v, units, bad),
    (body) => add.mutateAsync(body),
  );
  const l = units.label('length');
  return (
    <Frame title={title ?? 'Add a dimension check'}>
      <form noValidate aria-label={title ?? 'Add a dimension check'} onSubmit={(e) => void submit('Dimensions saved.')(e)}>
        <FormError message={form.formState.errors.root?.message} />
        <div className="grid gap-x-3 sm:grid-cols-3">
          {stage ? null : <Select form={form} name="stage" label="Stage" options={CHECK_STAGES.map((s) => ({ value: s, label: CHECK_STAGE_LABELS[s] }))} />}
          <Input form={form} name="lengthMm" label={`Length (${l})`} inputMode="decimal" />
          <Input form={form} name="widthMm" label={`Width (${l})`} inputMode="decimal" />
          <Input form={form} name="thicknessMm" label={`Thickness (${l})`} inputMode="decimal" />
          <Input form={form} name="volumeCm3" label={`Or volume by immersion (${units.label('volume')})`} inputMode="decimal" hint="For pieces calipers cannot measure." />
          <Input form={form} name="method" label="Method (optional)" />
          <Input form={form} name="measuredAt" label="Measured at" type="datetime-local" />
        </div>
        <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
          Save the dimensions
        </button>
        <Done text={done} />
      </form>
    </Frame>
  );
}

export function HardnessForm({ coupon }: { coupon: CouponDetail }) {
  const add = useAddCheck(coupon.id);
  const { form, submit, done } = useContractForm(
    { stage: (coupon.role === 'treated' ? 'cured' : 'dry') as CheckStage, hardnessValue: '', hardnessScale: 'shore-d' as HardnessScale, method: '', measuredAt: localNow() },
    checkInputSchema,
    (v, bad) => {
      const n = numberOf(v.hardnessValue, 'hardnessValue', bad as never);
      if (n === undefined && !v.hardnessValue.trim()) bad('hardnessValue', 'Enter the reading');
      return { kind: 'hardness', stage: v.stage, hardnessValue: n, hardnessScale: v.hardnessScale, measuredAt: isoFromLocal(v.measuredAt), method: v.method.trim() || undefined };
    },
    (body) => add.mutateAsync(body),
  );
  return (
    <Frame title="Add a hardness reading">
      <form noValidate aria-label="Add a hardness reading" onSubmit={(e) => void submit('Hardness saved.', () => form.reset({ ...form.getValues(), hardnessValue: '' }))(e)}>
        <FormError message={form.formState.errors.root?.message} />
        <div className="grid gap-x-3 sm:grid-cols-3">
          <Select form={form} name="stage" label="Stage" options={CHECK_STAGES.map((s) => ({ value: s, label: CHECK_STAGE_LABELS[s] }))} />
          <Input form={form} name="hardnessValue" label="Reading" inputMode="decimal" />
          <Select form={form} name="hardnessScale" label="Scale" options={HARDNESS_SCALES.map((s) => ({ value: s, label: HARDNESS_SCALE_LABELS[s] }))} />
          <Input form={form} name="method" label="Method (optional)" />
          <Input form={form} name="measuredAt" label="Measured at" type="datetime-local" />
        </div>
        <p className="mb-2 text-xs text-ink-faint">Shore D, Janka and Brinell are different tests: each reading stays on the scale it was taken in and is never converted.</p>
        <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
          Save the reading
        </button>
        <Done text={done} />
      </form>
    </Frame>
  );
}

export function MoistureForm({ coupon }: { coupon: CouponDetail }) {
  const add = useAddCheck(coupon.id);
  const { form, submit, done } = useContractForm(
    { stage: 'dry' as CheckStage, moisturePct: '', method: '', measuredAt: localNow() },
    checkInputSchema,
    (v, bad) => {
      const n = numberOf(v.moisturePct, 'moisturePct', bad as never);
      if (n === undefined && !v.moisturePct.trim()) bad('moisturePct', 'Enter the moisture content');
      return { kind: 'moisture', stage: v.stage, moisturePct: n, measuredAt: isoFromLocal(v.measuredAt), method: v.method.trim() || undefined };
    },
    (body) => add.mutateAsync(body),
  );
  return (
    <Frame title="Add a moisture reading">
      <form noValidate aria-label="Add a moisture reading" onSubmit={(e) => void submit('Moisture saved.', () => form.reset({ ...form.getValues(), moisturePct: '' }))(e)}>
        <FormError message={form.formState.errors.root?.message} />
        <div className="grid gap-x-3 sm:grid-cols-3">
          <Select form={form} name="stage" label="Stage" options={CHECK_STAGES.map((s) => ({ value: s, label: CHECK_STAGE_LABELS[s] }))} />
          <Input form={form} name="moisturePct" label="Moisture content (%, oven-dry basis)" inputMode="decimal" />
          <Input form={form} name="method" label="Method (optional)" hint="e.g. pin meter, oven-dry" />
          <Input form={form} name="measuredAt" label="Measured at" type="datetime-local" />
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
  massG: string;
  lengthMm: string;
  widthMm: string;
  thicknessMm: string;
  volumeCm3: string;
  measuredAt: string;
}

/** Water-soak stability: the after-soak mass, and the after-soak size or volume when measured. */
export function SoakTestForm({ coupon }: { coupon: CouponDetail }) {
  const units = useUnits();
  const addW = useAddWeighing(coupon.id);
  const addC = useAddCheck(coupon.id);
  const [done, setDone] = useState<string | null>(null);
  const hasMass = coupon.weighings.some((w) => w.stage === 'wet-test');
  const hasSize = coupon.checks.some((c) => c.kind === 'dimension' && c.stage === 'wet-test');
  const form = useForm<SoakValues>({ defaultValues: { massG: '', lengthMm: '', widthMm: '', thicknessMm: '', volumeCm3: '', measuredAt: localNow() } });
  const base = coupon.role === 'treated' ? 'cured' : 'dry';
  const baseMass = coupon.role === 'treated' ? coupon.metrics.curedMassG : coupon.metrics.dryMassG;
  const baseVol = coupon.role === 'treated' ? coupon.metrics.curedVolumeCm3 : coupon.metrics.dryVolumeCm3;
  const fields = ['massG', 'lengthMm', 'widthMm', 'thicknessMm', 'volumeCm3', 'measuredAt'] as const;

  const onSubmit = form.handleSubmit(async (v) => {
    setDone(null);
    let failed = false;
    const bad = (f: keyof SoakValues, m: string) => {
      failed = true;
      form.setError(f, { message: m });
    };
    const measuredAt = isoFromLocal(v.measuredAt);
    const mass = numberOf(v.massG, 'massG', bad as never);
    const dims = dimensionBody({ stage: 'wet-test', ...v, method: '' }, units, bad as never);
    const anyDim = [dims.lengthMm, dims.widthMm, dims.thicknessMm, dims.volumeCm3].some((x) => x !== undefined);
    if (failed) return;
    if (mass === undefined && !anyDim) return bad('massG', 'Enter the mass after the soak, or the size after it');
    const w = mass === undefined || hasMass ? null : weighingInputSchema.safeParse({ stage: 'wet-test', massG: units.fromDisplay(mass, 'mass'), measuredAt });
    const c = !anyDim || hasSize ? null : checkInputSchema.safeParse(dims);
    if (w && !w.success) return bad('massG', w.error.issues[0]?.message ?? 'Check the mass');
    if (c && !c.success) {
      for (const i of c.error.issues) bad(String(i.path[0] ?? 'lengthMm') as keyof SoakValues, i.message);
      return;
    }
    try {
      if (w?.success) await addW.mutateAsync(w.data);
      if (c?.success) await addC.mutateAsync(c.data);
      form.reset({ ...v, massG: '', lengthMm: '', widthMm: '', thicknessMm: '', volumeCm3: '' });
      setDone('Soak test saved.');
    } catch (err) {
      applyServerErrors(err, form.setError, fields);
    }
  });
  const l = units.label('length');
  return (
    <Frame title="Water-soak stability test">
      <p className="mb-2 text-sm text-ink-soft">
        A short soak (about an hour under water, an hour to drain; common practice, no published source) and a reweigh. Swelling is worked out from the {base} state
        {baseMass !== null ? ` (${units.format(baseMass, 'mass')}` : ' (no mass yet'}
        {baseVol !== null ? `, ${units.format(baseVol, 'volume')})` : ')'}
        {coupon.role === 'treated' ? '; ASE compares it with the untreated controls of the same species in the trial.' : '.'}
      </p>
      <form noValidate aria-label="Water-soak stability test" onSubmit={(e) => void onSubmit(e)}>
        <FormError message={form.formState.errors.root?.message} />
        <div className="grid gap-x-3 sm:grid-cols-3">
          {!hasMass && <Input form={form} name="massG" label={`Mass after the soak (${units.label('mass')})`} inputMode="decimal" />}
          {!hasSize && (
            <>
              <Input form={form} name="lengthMm" label={`Length after (${l})`} inputMode="decimal" />
              <Input form={form} name="widthMm" label={`Width after (${l})`} inputMode="decimal" />
              <Input form={form} name="thicknessMm" label={`Thickness after (${l})`} inputMode="decimal" />
              <Input form={form} name="volumeCm3" label={`Or volume after, by immersion (${units.label('volume')})`} inputMode="decimal" />
            </>
          )}
          {!(hasMass && hasSize) && <Input form={form} name="measuredAt" label="Measured at" type="datetime-local" />}
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

/** A correction supersedes the reading; the old value stays in the history with the reason. */
export function CorrectWeighingForm({ weighing, onDone }: { weighing: WeighingOut; onDone: () => void }) {
  const units = useUnits();
  const correct = useCorrectWeighing();
  const { form, submit } = useContractForm(
    { massG: units.toDisplay(weighing.massG, 'mass').toFixed(4).replace(/\.?0+$/, ''), reason: '' },
    correctWeighingSchema,
    (v, bad) => {
      const n = numberOf(v.massG, 'massG', bad as never);
      if (n === undefined && !v.massG.trim()) bad('massG', 'Enter the corrected mass');
      return { massG: n === undefined ? undefined : units.fromDisplay(n, 'mass'), reason: v.reason };
    },
    (body) => correct.mutateAsync({ id: weighing.id, ...body }),
  );
  return (
    <form noValidate aria-label={`Correct the ${weighing.stage} weighing`} onSubmit={(e) => void submit('Corrected.', onDone)(e)} className="mt-2 rounded border border-rule bg-white/50 p-3">
      <FormError message={form.formState.errors.root?.message} />
      <div className="grid gap-x-3 sm:grid-cols-2">
        <Input form={form} name="massG" label={`Corrected mass (${units.label('mass')})`} inputMode="decimal" />
        <Input form={form} name="reason" label="Reason for the correction" hint="Kept in the history beside the old value." />
      </div>
      <div className="flex gap-2">
        <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
          Save the correction
        </button>
        <button type="button" className="btn-quiet" onClick={onDone}>
          Cancel
        </button>
      </div>
    </form>
  );
}

export function CorrectCheckForm({ check, onDone }: { check: CheckOut; onDone: () => void }) {
  const units = useUnits();
  const correct = useCorrectCheck();
  const show = (v: number | null, q: 'length' | 'volume') => (v === null ? '' : units.toDisplay(v, q).toFixed(4).replace(/\.?0+$/, ''));
  const initial = {
    lengthMm: show(check.lengthMm, 'length'),
    widthMm: show(check.widthMm, 'length'),
    thicknessMm: show(check.thicknessMm, 'length'),
    volumeCm3: show(check.volumeCm3, 'volume'),
    hardnessValue: check.hardnessValue === null ? '' : String(check.hardnessValue),
    moisturePct: check.moisturePct === null ? '' : String(check.moisturePct),
    reason: '',
  };
  const { form, submit } = useContractForm(
    initial,
    correctCheckSchema,
    (v, bad) => {
      // Only what was changed is sent, so an untouched value is not nudged by a round trip through the display unit.
      const changed = (f: 'lengthMm' | 'widthMm' | 'thicknessMm' | 'volumeCm3' | 'hardnessValue' | 'moisturePct') => (v[f] === initial[f] ? undefined : numberOf(v[f], f, bad as never));
      const len = (f: 'lengthMm' | 'widthMm' | 'thicknessMm') => {
        const x = changed(f);
        return x === undefined ? undefined : units.fromDisplay(x, 'length');
      };
      if (check.kind === 'dimension') {
        const vol = changed('volumeCm3');
        return { lengthMm: len('lengthMm'), widthMm: len('widthMm'), thicknessMm: len('thicknessMm'), volumeCm3: vol === undefined ? undefined : units.fromDisplay(vol, 'volume'), reason: v.reason };
      }
      if (check.kind === 'hardness') return { hardnessValue: changed('hardnessValue'), reason: v.reason };
      return { moisturePct: changed('moisturePct'), reason: v.reason };
    },
    (body) => correct.mutateAsync({ id: check.id, ...body }),
  );
  const l = units.label('length');
  return (
    <form noValidate aria-label={`Correct the ${check.kind} check`} onSubmit={(e) => void submit('Corrected.', onDone)(e)} className="mt-2 rounded border border-rule bg-white/50 p-3">
      <FormError message={form.formState.errors.root?.message} />
      <div className="grid gap-x-3 sm:grid-cols-3">
        {check.kind === 'dimension' && (
          <>
            <Input form={form} name="lengthMm" label={`Length (${l})`} inputMode="decimal" />
            <Input form={form} name="widthMm" label={`Width (${l})`} inputMode="decimal" />
            <Input form={form} name="thicknessMm" label={`Thickness (${l})`} inputMode="decimal" />
            <Input form={form} name="volumeCm3" label={`Volume (${units.label('volume')})`} inputMode="decimal" />
          </>
        )}
        {check.kind === 'hardness' && <Input form={form} name="hardnessValue" label={`Reading (${check.hardnessScale ? HARDNESS_SCALE_LABELS[check.hardnessScale] : 'scale'})`} inputMode="decimal" />}
        {check.kind === 'moisture' && <Input form={form} name="moisturePct" label="Moisture content (%)" inputMode="decimal" />}
        <Input form={form} name="reason" label="Reason for the correction" hint="Kept in the history beside the old value." className="sm:col-span-2" />
      </div>
      <div className="flex gap-2">
        <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
          Save the correction
        </button>
        <button type="button" className="btn-quiet" onClick={onDone}>
          Cancel
        </button>
      </div>
    </form>
  );
}
