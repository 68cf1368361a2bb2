import { useEffect, useId, useRef } from 'react';
import { useForm } from 'react-hook-form';
import { LOT_STATUSES, type LotStatus } from '../../../../shared/constants/records';
import { updateResinLotSchema, type ResinLot, type UpdateResinLotInput } from '../../../../shared/schemas/reference';
import { NumberField } from '../../../components/ui/number-field';
import { Field, FormError, SelectField, FormActions } from '../../../components/ui/field';
import { applyServerErrors } from '../../../lib/form-errors';
import { useUpdateLot } from '../api/use-update-lot';
import { convertingResolver } from '../../../lib/forms/resolver';
import { lotExpiryWord, LotExpiryMark } from './lot-expiry';
import { LOT_STATUS_LABELS } from './labels';

interface FormValues {
  lotId: string;
  reuseCount?: number;
  status: LotStatus;
  reason: string;
}

const FIELDS = ['reuseCount', 'status', 'reason'] as const;

/** Records a reuse of a lot (drained back after a run) or a change of its status. */
export function LotChangeForm({
  lots,
  initialLotId,
  onDone,
  onCancel,
}: {
  lots: readonly ResinLot[];
  initialLotId: number;
  onDone: (code: string) => void;
  onCancel: () => void;
}) {
  const update = useUpdateLot();
  const byId = (id: string) => lots.find((l) => String(l.id) === id);
  const initial = byId(String(initialLotId));

  // Only what changed goes to the server, so the audit log shows one honest change.
  const resolver = convertingResolver<FormValues, typeof updateResinLotSchema>(
    updateResinLotSchema,
    ({ lotId, reuseCount, status, reason }) => {
      const lot = byId(lotId);
      return {
        ...(reuseCount !== lot?.reuseCount ? { reuseCount, expectedReuseCount: lot?.reuseCount } : {}),
        ...(status !== lot?.status ? { status } : {}),
        ...(reason.trim() ? { reason } : {}),
      };
    },
    { '': 'root' },
  );
  const form = useForm<FormValues, unknown, UpdateResinLotInput>({
    resolver,
    defaultValues: { lotId: String(initialLotId), reuseCount: initial?.reuseCount ?? 0, status: initial?.status ?? 'active', reason: '' },
  });
  const { errors } = form.formState;
  const lotId = form.watch('lotId');
  const lot = byId(lotId);
  const headingRef = useRef<HTMLHeadingElement>(null);
  const pickNoteId = useId();
  useEffect(() => headingRef.current?.focus(), []);

  // A different lot picked: start from that lot's own numbers.
  useEffect(() => {
    const picked = lots.find((l) => String(l.id) === lotId);
    if (picked) {
      form.setValue('reuseCount', picked.reuseCount);
      form.setValue('status', picked.status);
    }
  }, [lotId, lots, form]);

  const onSubmit = form.handleSubmit(async (values) => {
    if (!lot) return;
    try {
      await update.mutateAsync({ id: lot.id, ...values });
      onDone(lot.code);
    } catch (err) {
      applyServerErrors(err, form.setError, FIELDS);
    }
  });

  const lotOptions = lots.map((l) => {
    const word = lotExpiryWord(l);
    return { value: String(l.id), label: `${l.code} · ${l.resinName}${word ? ` · ${word}` : ''}` };
  });
  const statusOptions = LOT_STATUSES.map((s) => ({ value: s, label: LOT_STATUS_LABELS[s] }));

  return (
    <section aria-labelledby="lot-change-heading" className="sheet mb-6 max-w-3xl p-5">
      <h3 id="lot-change-heading" ref={headingRef} tabIndex={-1} className="mb-3 text-base font-semibold">
        Record a reuse or a status change
      </h3>
      <form onSubmit={onSubmit} noValidate aria-labelledby="lot-change-heading">
        <FormError message={errors.root?.message} />
        <div className="grid items-start gap-x-4 sm:grid-cols-2">
          <SelectField label="Lot" registration={form.register('lotId')} options={lotOptions} aria-describedby={pickNoteId} />
          <div id={pickNoteId} className="mb-4 pt-6 text-sm" aria-live="polite">
            {lot && (
              <>
                <LotExpiryMark lot={lot} long />
                <p className="mt-1 text-ink-soft">
                  {lot.ageDays} days old, reused {lot.reuseCount === 1 ? 'once' : `${lot.reuseCount} times`}.{' '}
                  {lot.speciesThroughLot.length ? `Has been through: ${lot.speciesThroughLot.join(', ')}.` : 'No wood through it yet.'}
                </p>
              </>
            )}
          </div>
          <div>
            <NumberField form={form} name="reuseCount" label="Reuse count" required hint="Drained back into the jar after a run counts as one reuse" />
            <button
              type="button"
              className="btn-quiet -mt-2 mb-4"
              onClick={() => form.setValue('reuseCount', (form.getValues('reuseCount') ?? 0) + 1, { shouldDirty: true })}
            >
              One more reuse
            </button>
          </div>
          <SelectField label="Status" registration={form.register('status')} options={statusOptions} error={errors.status?.message} />
        </div>
        <Field
          label="Why (kept with the change)"
          registration={form.register('reason')}
          error={errors.reason?.message}
          hint='e.g. "drained back after the maple run"'
        />
        <FormActions submitLabel="Save the change" busy={form.formState.isSubmitting} onCancel={onCancel} />
      </form>
    </section>
  );
}
