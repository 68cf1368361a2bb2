import { useEffect, useRef } from 'react';
import { useForm } from 'react-hook-form';
import { createResinSchema, DEFAULT_CURE_WINDOW_C, type CreateResinInput, type Resin } from '../../../../shared/schemas/reference';
import { NumberField } from '../../../components/ui/number-field';
import { Field, FormError, TextAreaField, FormActions } from '../../../components/ui/field';
import { applyServerErrors } from '../../../lib/form-errors';
import { useUnits } from '../../../lib/use-units';
import { useCreateResin } from '../api/use-create-resin';
import { useUpdateResin } from '../api/use-update-resin';
import { renameFields, textOrNull } from '../../../lib/form-values';
import { convertingResolver } from '../../../lib/forms/resolver';
import { toBox } from '../../../lib/forms/number-input';
import { formatTemperatureRange } from '../../../../shared/runs/format';

/** As typed: cure temperatures and densities in the user's units; everything else as the contract has it. */
interface FormValues {
  name: string;
  kind: string;
  liquidDensityGcm3?: number;
  curedDensityGcm3?: number;
  cureMin?: number;
  cureMax?: number;
  shelfLifeDays?: number;
  notes?: string | null;
  /** Editing only: why, which the server requires when the change moves measured coupons' results. */
  reason?: string;
}

const FIELDS = ['name', 'kind', 'liquidDensityGcm3', 'curedDensityGcm3', 'cureMin', 'cureMax', 'shelfLifeDays', 'notes', 'reason'] as const;
const RENAMED = { cureMinC: 'cureMin', cureMaxC: 'cureMax' };

export function ResinForm({ resin, onDone, onCancel }: { resin: Resin | null; onDone: (name: string) => void; onCancel: () => void }) {
  const units = useUnits();
  const create = useCreateResin();
  const update = useUpdateResin();
  // Round the shown value so a stored 93.333 °C reads back as the 200.0 °F that was typed.
  const shown = (c: number) => Math.round(units.toDisplay(c, 'temperature') * 10) / 10;

  // Cure temperatures are typed in the user's unit and checked in °C by the contract.
  const toC = (v: number | undefined) => (v === undefined ? v : units.fromDisplay(v, 'temperature'));
  // Densities are stored in g/cm³ (the resin maker's sheet) and typed in the user's density unit; 1 g/cm³ = 1000 kg/m³.
  const toGcm3 = (v: number | undefined) => (v === undefined || Number.isNaN(v) ? v : units.fromDisplay(v, 'density') / 1000);
  const densityBox = (gcm3: number) => toBox(gcm3 * 1000, 'density', units) ?? undefined;
  const resolver = convertingResolver<FormValues, typeof createResinSchema>(
    createResinSchema,
    // The reason is not a field of the resin: the create contract refuses it, and the update takes it beside the fields.
    ({ cureMin, cureMax, liquidDensityGcm3, curedDensityGcm3, reason: _reason, ...rest }) => ({
      ...rest,
      liquidDensityGcm3: toGcm3(liquidDensityGcm3),
      curedDensityGcm3: toGcm3(curedDensityGcm3),
      cureMinC: toC(cureMin),
      cureMaxC: toC(cureMax),
    }),
    RENAMED,
  );

  const form = useForm<FormValues, unknown, CreateResinInput>({
    resolver,
    defaultValues: resin
      ? {
          name: resin.name,
          kind: resin.kind,
          liquidDensityGcm3: densityBox(resin.liquidDensityGcm3),
          curedDensityGcm3: densityBox(resin.curedDensityGcm3),
          cureMin: shown(resin.cureMinC),
          cureMax: shown(resin.cureMaxC),
          shelfLifeDays: resin.shelfLifeDays,
          notes: resin.notes,
        }
      : { name: '', kind: '', cureMin: shown(DEFAULT_CURE_WINDOW_C.min), cureMax: shown(DEFAULT_CURE_WINDOW_C.max), notes: null },
  });
  const { errors } = form.formState;
  const headingRef = useRef<HTMLHeadingElement>(null);
  useEffect(() => headingRef.current?.focus(), []);

  const onSubmit = form.handleSubmit(async (values) => {
    try {
      const reason = form.getValues('reason')?.trim();
      if (resin) await update.mutateAsync({ id: resin.id, ...values, ...(reason ? { reason } : {}) });
      else await create.mutateAsync(values);
      onDone(values.name);
    } catch (err) {
      applyServerErrors(renameFields(err, RENAMED), form.setError, FIELDS);
    }
  });

  return (
    <section aria-labelledby="resin-form-heading" className="sheet mb-6 max-w-3xl p-5">
      <h3 id="resin-form-heading" ref={headingRef} tabIndex={-1} className="mb-3 text-base font-semibold">
        {resin ? `Edit ${resin.name}` : 'Add a resin'}
      </h3>
      <form onSubmit={onSubmit} noValidate aria-labelledby="resin-form-heading">
        <FormError message={errors.root?.message} />
        <div className="grid gap-x-4 sm:grid-cols-2">
          <Field label="Name" registration={form.register('name')} error={errors.name?.message} hint="The name the shop uses for it" />
          <Field label="Kind" registration={form.register('kind')} error={errors.kind?.message} hint="e.g. methacrylate monomer blend" />
          <NumberField form={form} name="liquidDensityGcm3" label="Liquid density" quantity="density" required />
          <NumberField form={form} name="curedDensityGcm3" label="Cured density" quantity="density" required />
          <NumberField form={form} name="cureMin" label="Lowest cure temperature" quantity="temperature" required />
          <NumberField
            form={form}
            name="cureMax"
            label="Highest cure temperature"
            quantity="temperature"
            required
            hint={`About ${formatTemperatureRange(DEFAULT_CURE_WINDOW_C.min, DEFAULT_CURE_WINDOW_C.max, units.prefs)} is common practice for heat-cure resins; the resin maker's sheet governs`}
          />
          <NumberField
            form={form}
            name="shelfLifeDays"
            label="Shelf life once activated (days)"
            required
            hint={resin ? undefined : "Leave empty to use the shop's setting"}
          />
        </div>
        <TextAreaField label="Notes" registration={form.register('notes', textOrNull)} error={errors.notes?.message} />
        {resin && (
          <Field
            label="Why it changes"
            registration={form.register('reason')}
            error={errors.reason?.message}
            hint="Needed when the change moves measured coupons' results (a new cured density moves their void fill); kept on each such coupon's history."
          />
        )}
        <FormActions submitLabel={resin ? 'Save the changes' : 'Add the resin'} busy={form.formState.isSubmitting} onCancel={onCancel} />
      </form>
    </section>
  );
}
