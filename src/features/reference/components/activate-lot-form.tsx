import { useQuery } from '@tanstack/react-query';
import { useEffect, useRef } from 'react';
import { useForm } from 'react-hook-form';
import { createResinLotSchema, type CreateResinLotInput } from '../../../../shared/schemas/reference';
import { NumberField } from '../../../components/ui/number-field';
import { Field, FormError, SelectField, TextAreaField, FormActions } from '../../../components/ui/field';
import { applyServerErrors } from '../../../lib/form-errors';
import { useUnits } from '../../../lib/use-units';
import { resinListQuery } from '../../../lib/queries/reference';
import { useActivateLot } from '../api/use-activate-lot';
import { CautionNote } from './caution-note';
import { renameFields, textOrNull } from '../../../lib/form-values';
import { convertingResolver } from '../../../lib/forms/resolver';
import { todayLocalDate } from '../../../lib/format/dates';

/** As typed: the volume in the user's volume unit. */
interface FormValues {
  resinId: string;
  code: string;
  activatedAt: string;
  volume?: number;
  catalystNotes: string | null;
  dyeNotes: string | null;
  notes: string | null;
}

const RENAMED = { volumeMl: 'volume' };
const FIELDS = ['resinId', 'code', 'activatedAt', 'volume', 'catalystNotes', 'dyeNotes', 'notes'] as const;
const DAY_MS = 86_400_000;

function today(): string {
  return todayLocalDate();
}

/** Records a resin lot as it is activated (technician and above). */
export function ActivateLotForm({ onDone, onCancel }: { onDone: (code: string) => void; onCancel: () => void }) {
  const units = useUnits();
  const resins = useQuery(resinListQuery());
  const activate = useActivateLot();
  const resolver = convertingResolver<FormValues, typeof createResinLotSchema>(
    createResinLotSchema,
    ({ resinId, volume, ...rest }) => ({
      ...rest,
      resinId: resinId === '' ? undefined : Number(resinId),
      volumeMl: volume === undefined ? undefined : units.fromDisplay(volume, 'liquidVolume'),
    }),
    RENAMED,
  );
  const form = useForm<FormValues, unknown, CreateResinLotInput>({
    resolver,
    defaultValues: { resinId: '', code: '', activatedAt: today(), catalystNotes: null, dyeNotes: null, notes: null },
  });
  const { errors } = form.formState;
  const headingRef = useRef<HTMLHeadingElement>(null);
  useEffect(() => headingRef.current?.focus(), []);

  const resin = resins.data?.items.find((r) => String(r.id) === form.watch('resinId'));
  const activatedAt = form.watch('activatedAt');
  const keepsUntil =
    resin && /^\d{4}-\d{2}-\d{2}$/.test(activatedAt)
      ? new Date(Date.parse(`${activatedAt}T00:00:00Z`) + resin.shelfLifeDays * DAY_MS).toISOString().slice(0, 10)
      : null;

  const onSubmit = form.handleSubmit(async (values) => {
    try {
      await activate.mutateAsync(values);
      onDone(values.code);
    } catch (err) {
      applyServerErrors(renameFields(err, RENAMED), form.setError, FIELDS);
    }
  });

  const options = [{ value: '', label: 'Pick the resin' }, ...(resins.data?.items ?? []).map((r) => ({ value: String(r.id), label: r.name }))];
  return (
    <section aria-labelledby="activate-heading" className="sheet mb-6 max-w-3xl p-5">
      <h3 id="activate-heading" ref={headingRef} tabIndex={-1} className="mb-3 text-base font-semibold">
        Activate a new lot
      </h3>
      <CautionNote>resin and catalyst need gloves and eye protection; follow the resin's safety data sheet.</CautionNote>
      <form onSubmit={onSubmit} noValidate aria-labelledby="activate-heading">
        <FormError message={errors.root?.message} />
        <div className="grid gap-x-4 sm:grid-cols-2">
          <SelectField label="Resin" registration={form.register('resinId')} options={options} error={errors.resinId?.message} />
          <Field label="Lot code" registration={form.register('code')} error={errors.code?.message} hint="As written on the jar, e.g. CP90-2026-03" />
          <Field
            label="Activated on"
            type="date"
            registration={form.register('activatedAt')}
            error={errors.activatedAt?.message}
            hint={keepsUntil ? `At ${resin?.shelfLifeDays} days' shelf life it keeps until about ${keepsUntil}, stored cool.` : undefined}
          />
          <NumberField form={form} name="volume" label="Volume" quantity="liquidVolume" required />
          <Field
            label="Catalyst"
            registration={form.register('catalystNotes', textOrNull)}
            error={errors.catalystNotes?.message}
            hint="What was added, and how much"
          />
          <Field label="Dye" registration={form.register('dyeNotes', textOrNull)} error={errors.dyeNotes?.message} hint="Leave empty for a clear lot" />
        </div>
        <TextAreaField label="Notes" registration={form.register('notes', textOrNull)} error={errors.notes?.message} />
        <FormActions submitLabel="Record the lot" busy={form.formState.isSubmitting} onCancel={onCancel} />
      </form>
    </section>
  );
}
