import { useEffect, useMemo, useRef } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { SPECIES_ORIGINS } from '../../../../shared/constants/records';
import { createSpeciesSchema, type CreateSpeciesInput, type Species } from '../../../../shared/schemas/reference';
import { NumberField } from '../../../components/ui/number-field';
import { Field, FormError, TextAreaField, FormActions } from '../../../components/ui/field';
import { applyServerErrors } from '../../../lib/form-errors';
import { useCreateSpecies } from '../api/use-create-species';
import { useUpdateSpecies } from '../api/use-update-species';
import { textOrNull } from '../../../lib/form-values';
import { convertingResolver } from '../../../lib/forms/resolver';
import { toBox, toSi, type DisplayUnits } from '../../../lib/forms/number-input';
import { useUnits } from '../../../lib/use-units';

type FormValues = z.input<typeof createSpeciesSchema>;

const FIELDS = [
  'commonName',
  'botanicalName',
  'basicSg',
  'sg12',
  'sideHardnessN',
  'measuredDensityKgM3',
  'measuredMoisturePct',
  'sgCoefficientOfVariation',
  'source',
  'origin',
  'notes',
] as const;

// Hardness (a force, stored in N) and the measured density (stored in kg/m³) are typed in the user's
// units. A handbook row carries no measured density; drop what may have been typed before the origin was switched.
const resolverFor = (units: DisplayUnits) =>
  convertingResolver<FormValues, typeof createSpeciesSchema>(createSpeciesSchema, (values) => {
    const si = {
      ...values,
      sideHardnessN: toSi(values.sideHardnessN, 'force', units),
      measuredDensityKgM3: toSi(values.measuredDensityKgM3, 'density', units),
    };
    return values.origin === 'handbook' ? { ...si, measuredDensityKgM3: null, measuredMoisturePct: null } : si;
  });

function defaultsOf(s: Species | null, units: DisplayUnits): FormValues {
  if (!s) {
    return {
      commonName: '',
      botanicalName: '',
      basicSg: null,
      sg12: null,
      sideHardnessN: null,
      measuredDensityKgM3: null,
      measuredMoisturePct: null,
      sgCoefficientOfVariation: null,
      source: '',
      origin: 'handbook',
      notes: null,
    };
  }
  const { id: _id, createdAt: _c, ...rest } = s;
  return { ...rest, sideHardnessN: toBox(s.sideHardnessN, 'force', units), measuredDensityKgM3: toBox(s.measuredDensityKgM3, 'density', units) };
}

/** Adds a species, or edits one (admin). */
export function SpeciesForm({ species, onDone, onCancel }: { species: Species | null; onDone: (name: string) => void; onCancel: () => void }) {
  const create = useCreateSpecies();
  const update = useUpdateSpecies();
  const units = useUnits();
  const resolver = useMemo(() => resolverFor(units), [units]);
  const form = useForm<FormValues, unknown, CreateSpeciesInput>({ resolver, defaultValues: defaultsOf(species, units) });
  const { errors } = form.formState;
  const origin = form.watch('origin');
  const headingRef = useRef<HTMLHeadingElement>(null);
  useEffect(() => headingRef.current?.focus(), []);

  const onSubmit = form.handleSubmit(async (values) => {
    try {
      if (species) await update.mutateAsync({ id: species.id, ...values });
      else await create.mutateAsync(values);
      onDone(values.commonName);
    } catch (err) {
      applyServerErrors(err, form.setError, FIELDS);
    }
  });

  const title = species ? `Edit ${species.commonName}` : 'Add a species';
  return (
    <section aria-labelledby="species-form-heading" className="sheet mb-6 max-w-3xl p-5">
      <h3 id="species-form-heading" ref={headingRef} tabIndex={-1} className="mb-3 text-base font-semibold">
        {title}
      </h3>
      <form onSubmit={onSubmit} noValidate aria-labelledby="species-form-heading">
        <FormError message={errors.root?.message} />
        <fieldset className="mb-4">
          <legend className="field-label">Where the values come from</legend>
          <div className="mt-1 flex flex-wrap gap-4">
            {SPECIES_ORIGINS.map((o) => (
              <label key={o} className="flex items-center gap-2 text-sm">
                <input type="radio" value={o} {...form.register('origin')} />
                {o === 'handbook' ? 'A published handbook table' : 'Measured in this shop'}
              </label>
            ))}
          </div>
          {errors.origin?.message && (
            <p className="mt-1 text-sm text-margin" role="alert">
              {errors.origin.message}
            </p>
          )}
        </fieldset>
        <div className="grid gap-x-4 sm:grid-cols-2">
          <Field
            label="Common name"
            registration={form.register('commonName')}
            error={errors.commonName?.message}
            hint='Handbook style reads well in lists, e.g. "Maple, red"'
          />
          <Field label="Botanical name" registration={form.register('botanicalName')} error={errors.botanicalName?.message} />
          <NumberField form={form} name="basicSg" label="Basic specific gravity" hint="Oven-dry mass over green volume" />
          <NumberField form={form} name="sg12" label="Specific gravity at 12 % MC" hint="Oven-dry mass over volume at 12 % moisture content" />
          <NumberField
            form={form}
            name="sideHardnessN"
            label="Side hardness at 12 % MC"
            quantity="force"
            hint="The load that presses the ball in (ASTM D143), as the table gives it; converted from the unit shown"
          />
          <NumberField
            form={form}
            name="sgCoefficientOfVariation"
            label="SG coefficient of variation (fraction)"
            hint="e.g. 0.10; leave empty when the source gives none"
          />
          {origin === 'shop-measured' && (
            <>
              <NumberField form={form} name="measuredDensityKgM3" label="Measured density" quantity="density" />
              <NumberField form={form} name="measuredMoisturePct" label="Moisture content at that density (%)" />
            </>
          )}
        </div>
        <Field
          label="Source"
          registration={form.register('source')}
          error={errors.source?.message}
          hint={
            origin === 'handbook'
              ? 'The table it comes from, e.g. "USDA Wood Handbook FPL-GTR-190 (2021), Table 5-3a"'
              : 'Who measured it, when, and how (e.g. "shop, 3 blanks, oven-dry and caliper volume, 2025-03")'
          }
        />
        <TextAreaField label="Notes" registration={form.register('notes', textOrNull)} error={errors.notes?.message} />
        <FormActions submitLabel={species ? 'Save the changes' : 'Add the species'} busy={form.formState.isSubmitting} onCancel={onCancel} />
      </form>
    </section>
  );
}
