import { useQuery } from '@tanstack/react-query';
import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { shopSettingsSchema, type ShopSettings } from '../../../../shared/schemas/admin';
import { AltitudeQuestion } from '../../../components/ui/altitude-question';
import { Field, FormError } from '../../../components/ui/field';
import { NumberField } from '../../../components/ui/number-field';
import { toBox, toSi } from '../../../lib/forms/number-input';
import { convertingResolver } from '../../../lib/forms/resolver';
import { useUnits } from '../../../lib/use-units';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { applyServerErrors } from '../../../lib/form-errors';
import { renameFields } from '../../../lib/form-values';
import { labelAddressQuery, settingsQuery } from '../../../lib/queries/settings';
import { useBackup, useUpdateSettings } from '../api/admin-queries';

const FIELDS = ['shopName', 'altitude', 'dryingMinIntervalHours', 'dryingMaxChangePct', 'lotShelfLifeDays', 'labelBaseUrl'] as const;

/** The form's values: the settings, with the altitude in the user's altitude unit (m or ft) instead of metres. */
export type SettingsFormValues = Omit<ShopSettings, 'altitudeM'> & { altitude: number | null };
// The contract names the altitude in metres; the form's box holds it in the user's unit.
const RENAMES = { altitudeM: 'altitude' };

export function SettingsScreen() {
  const settings = useQuery(settingsQuery());
  return (
    <Page title="Shop settings">
      {settings.isPending ? <Loading /> : settings.isError ? <ErrorNote error={settings.error} /> : <SettingsForm initial={settings.data} />}
      <BackupPanel />
    </Page>
  );
}

/** What the labels will really open, as the server works it out, with a warning when a phone cannot open it. */
function LabelAddressNote() {
  const address = useQuery(labelAddressQuery());
  if (!address.data) return null;
  const a = address.data;
  return (
    <div
      className={`mb-4 rounded border px-3 py-2 text-sm ${a.warning ? 'border-margin text-margin' : 'border-rule text-ink-soft'}`}
      role={a.warning ? 'alert' : undefined}
    >
      <p>
        Labels now open <code className="break-all">{a.url}/coupons/…</code> ({a.source === 'setting' ? 'set here' : 'from APP_URL'}).
      </p>
      {a.warning && <p className="mt-1">{a.warning}</p>}
    </div>
  );
}

function SettingsForm({ initial }: { initial: ShopSettings }) {
  const update = useUpdateSettings();
  const [saved, setSaved] = useState(false);
  const units = useUnits();
  const resolver = useMemo(
    () =>
      convertingResolver<SettingsFormValues, typeof shopSettingsSchema>(
        shopSettingsSchema,
        ({ altitude, ...rest }) => ({ ...rest, altitudeM: toSi(altitude, 'altitude', units) ?? undefined }),
        RENAMES,
        { altitudeM: "Enter the shop's altitude" },
      ),
    [units],
  );
  const { altitudeM, ...rest } = initial;
  const form = useForm<SettingsFormValues, unknown, ShopSettings>({
    resolver,
    defaultValues: { ...rest, altitude: toBox(altitudeM, 'altitude', units) },
  });
  const { errors } = form.formState;
  const altitude = form.watch('altitude');
  const onSubmit = form.handleSubmit(async (values) => {
    setSaved(false);
    try {
      await update.mutateAsync(values);
      setSaved(true);
    } catch (err) {
      applyServerErrors(renameFields(err, RENAMES), form.setError, FIELDS);
    }
  });
  const num = { valueAsNumber: true } as const;
  return (
    <form onSubmit={onSubmit} noValidate className="sheet max-w-xl p-5" aria-label="Shop settings">
      <FormError message={errors.root?.message} />
      <Field label="Shop name" registration={form.register('shopName')} error={errors.shopName?.message} />
      <NumberField
        form={form}
        name="altitude"
        label="Shop altitude above sea level"
        quantity="altitude"
        required
        hint="Sets the ambient pressure used to turn vacuum-gauge readings into absolute pressure (ISO 2533 / U.S. Standard Atmosphere 1976)."
      />
      <AltitudeQuestion
        id="settings-altitude-question"
        altitudeM={altitude == null || Number.isNaN(altitude) ? null : units.fromDisplay(altitude, 'altitude')}
      />
      <Field
        label="Drying check: at least this many hours between weighings"
        type="number"
        step="0.5"
        registration={form.register('dryingMinIntervalHours', num)}
        error={errors.dryingMinIntervalHours?.message}
      />
      <Field
        label="Drying check: constant when the change is below (%)"
        type="number"
        step="0.01"
        registration={form.register('dryingMaxChangePct', num)}
        error={errors.dryingMaxChangePct?.message}
      />
      <Field
        label="Activated resin keeps (days)"
        type="number"
        step="1"
        registration={form.register('lotShelfLifeDays', num)}
        error={errors.lotShelfLifeDays?.message}
        hint="Used when a resin has no shelf life of its own; about a year stored cool is common practice."
      />
      <Field
        label="Address printed labels open"
        type="url"
        inputMode="url"
        placeholder="e.g. http://shop-pc:3000"
        registration={form.register('labelBaseUrl', { setValueAs: (v: unknown) => (typeof v === 'string' && v.trim() !== '' ? v.trim() : null) })}
        error={errors.labelBaseUrl?.message}
        hint="The address the shop's phones use to reach Lumenbook. Leave empty to use the server's APP_URL."
      />
      <LabelAddressNote />
      <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
        Save settings
      </button>
      {saved && (
        <p role="status" className="mt-2 text-sm text-moss">
          Saved.
        </p>
      )}
    </form>
  );
}

function BackupPanel() {
  const backup = useBackup();
  return (
    <section className="sheet mt-6 max-w-xl p-5" aria-labelledby="backup-heading">
      <h2 id="backup-heading">Backup</h2>
      <p className="my-2 text-sm text-ink-soft">
        One archive of the database (copied while the app keeps running) and every coupon and run photo, saved under the data folder's backups.{' '}
        <code>npm run restore</code> puts one back.
      </p>
      <button type="button" className="btn-quiet" onClick={() => backup.mutate()} disabled={backup.isPending}>
        Make a backup now
      </button>
      {backup.data && (
        <p role="status" className="mt-2 text-sm text-moss">
          Saved {backup.data.file} ({Math.round(backup.data.bytes / 1024)} KiB).
        </p>
      )}
      {backup.isError && <ErrorNote error={backup.error} />}
    </section>
  );
}
