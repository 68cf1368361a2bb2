import { useQuery } from '@tanstack/react-query';
import { useEffect, useMemo, useRef } from 'react';
import { useForm } from 'react-hook-form';
import { updateRunSchema, type RunDetail, type UpdateRunInput } from '../../../../shared/schemas/runs';
import { AltitudeQuestion } from '../../../components/ui/altitude-question';
import { Field, FormError, FormActions } from '../../../components/ui/field';
import { NumberField } from '../../../components/ui/number-field';
import { applyServerErrors } from '../../../lib/form-errors';
import { renameFields } from '../../../lib/form-values';
import { toBox, toSi } from '../../../lib/forms/number-input';
import { convertingResolver } from '../../../lib/forms/resolver';
import { lotListQuery } from '../../../lib/queries/reference';
import { useUnits } from '../../../lib/use-units';
import { useUpdateRun } from '../api/use-update-run';
import { LotSelect } from './lot-select';

const FIELDS = ['code', 'chamber', 'resinLotId', 'altitude', 'notes', 'reason'] as const;
const RENAMES = { altitudeM: 'altitude', '': 'root' };

interface DetailsValues {
  code: string;
  chamber: string;
  resinLotId: string;
  /** In the user's altitude unit, as the box shows it. */
  altitude: number | null;
  notes: string;
  reason: string;
}

/**
 * What a run's details need to be changed: which of them the person changed, and why when recorded
 * results move. Only changed fields are sent, so the run's history shows one honest change: a box left
 * as it was shown (an altitude rounded to the user's unit, say) is not a change.
 */
export function detailsChange(
  run: Pick<RunDetail, 'code' | 'chamber' | 'resinLotId' | 'altitudeM' | 'notes'>,
  v: DetailsValues,
  shownAltitude: number | null,
  altitudeM: number | null,
) {
  const notes = v.notes.trim() === '' ? null : v.notes;
  const lotId = v.resinLotId === '' ? null : Number(v.resinLotId);
  return {
    ...(v.code.trim() !== run.code ? { code: v.code.trim() } : {}),
    ...(v.chamber !== run.chamber ? { chamber: v.chamber } : {}),
    ...(lotId !== run.resinLotId ? { resinLotId: lotId } : {}),
    ...(v.altitude !== shownAltitude ? { altitudeM: altitudeM ?? undefined } : {}),
    ...(notes !== run.notes ? { notes } : {}),
    ...(v.reason.trim() ? { reason: v.reason.trim() } : {}),
  };
}

/**
 * Changes a run's code, chamber, resin lot, altitude or notes. A new altitude moves the absolute pressure
 * of recorded gauge readings and another lot may mean another resin (void fill moves), so the form asks
 * why; the server requires the reason when readings move and keeps it on the run's history.
 */
export function RunDetailsForm({ run, onDone, onCancel }: { run: RunDetail; onDone: (message: string) => void; onCancel: () => void }) {
  const units = useUnits();
  const update = useUpdateRun(run.id);
  const lots = useQuery(lotListQuery());
  const shownAltitude = toBox(run.altitudeM, 'altitude', units);
  const resolver = useMemo(
    () =>
      convertingResolver<DetailsValues, typeof updateRunSchema>(
        updateRunSchema,
        (v) => detailsChange(run, v, shownAltitude, toSi(v.altitude, 'altitude', units)),
        RENAMES,
      ),
    [run, shownAltitude, units],
  );
  const form = useForm<DetailsValues, unknown, UpdateRunInput>({
    resolver,
    defaultValues: {
      code: run.code,
      chamber: run.chamber,
      resinLotId: run.resinLotId === null ? '' : String(run.resinLotId),
      altitude: shownAltitude,
      notes: run.notes ?? '',
      reason: '',
    },
  });
  const { errors } = form.formState;
  const headingRef = useRef<HTMLHeadingElement>(null);
  useEffect(() => headingRef.current?.focus(), []);
  const altitude = form.watch('altitude');
  const lotId = Number(form.watch('resinLotId')) || null;
  const readings = run.stages.reduce((n, s) => n + s.readings.length, 0);

  const onSubmit = form.handleSubmit(async (values) => {
    try {
      await update.mutateAsync(values);
      onDone(`The run's details are saved.`);
    } catch (err) {
      applyServerErrors(renameFields(err, RENAMES), form.setError, FIELDS);
    }
  });

  return (
    <section aria-labelledby="run-details-heading" className="sheet mb-6 max-w-3xl p-5">
      <h2 id="run-details-heading" ref={headingRef} tabIndex={-1} className="mb-3">
        Change the run's details
      </h2>
      <form onSubmit={onSubmit} noValidate aria-labelledby="run-details-heading">
        <FormError message={errors.root?.message} />
        <div className="grid gap-x-6 sm:grid-cols-2">
          <Field label="Run code" registration={form.register('code')} error={errors.code?.message} />
          <Field label="Chamber" registration={form.register('chamber')} error={errors.chamber?.message} />
        </div>
        <LotSelect
          id="run-details-lot"
          lots={lots}
          registration={form.register('resinLotId')}
          pickedId={lotId}
          error={errors.resinLotId?.message}
          emptyLabel="No lot recorded"
          extraOption={run.lot && run.resinLotId !== null ? { id: run.resinLotId, label: `${run.lot.code} · ${run.lot.resin.name}` } : null}
          // The run's own lot was warned about when it was picked; only a new pick is.
          warnFor={(l) => l.id !== run.resinLotId}
        />
        <NumberField
          form={form}
          name="altitude"
          label="Shop altitude for this run"
          quantity="altitude"
          hint={
            readings > 0
              ? `It fixes the air pressure the gauge readings are subtracted from: a new altitude recomputes the ${readings} recorded reading${readings === 1 ? '' : 's'} (a stage with the shop's barometer keeps its own).`
              : 'It fixes the air pressure the gauge readings are subtracted from.'
          }
        />
        <AltitudeQuestion
          id="run-details-altitude-question"
          altitudeM={altitude == null || Number.isNaN(altitude) ? null : units.fromDisplay(altitude, 'altitude')}
        />
        <div className="mb-4">
          <label htmlFor="run-details-notes" className="field-label">
            Notes
          </label>
          <textarea id="run-details-notes" rows={2} className="field-input" {...form.register('notes')} />
        </div>
        <Field
          label="Why the details change"
          registration={form.register('reason')}
          error={errors.reason?.message}
          hint="Needed when recorded results move (a new altitude moves the gauge readings' absolute pressures); kept on the run's history."
        />
        <FormActions submitLabel="Save the details" busy={form.formState.isSubmitting} onCancel={onCancel} />
      </form>
    </section>
  );
}
