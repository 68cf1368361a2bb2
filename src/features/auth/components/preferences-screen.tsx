import { useState } from 'react';
import { UNIT_SYSTEMS_LIST, type UnitSystemName } from '../../../../shared/constants/units';
import { ROLE_LABELS } from '../../../../shared/constants/roles';
import { ErrorNote, Page } from '../../../components/ui/page';
import { useUpdatePreferences } from '../api/use-auth-mutations';
import { useMe } from '../../../lib/session';

const SYSTEM_LABELS: Record<UnitSystemName, string> = {
  metric: 'Metric — g, mm, °C, kPa',
  us: 'US customary — oz, in, °F, inHg',
};

export function PreferencesScreen() {
  const me = useMe();
  const update = useUpdatePreferences();
  const [saved, setSaved] = useState(false);
  if (!me) return null;
  return (
    <Page title="Your preferences">
      <section className="sheet max-w-xl p-5">
        <p className="mb-4 text-sm text-ink-soft">
          Signed in as {me.name} ({me.email}), {ROLE_LABELS[me.role]}.
        </p>
        <fieldset>
          <legend className="field-label mb-2">Display units</legend>
          <p className="mb-3 text-xs text-ink-faint">Measurements are stored in SI units; this only changes how they are shown and typed.</p>
          {UNIT_SYSTEMS_LIST.map((s) => (
            <label key={s} className="mb-2 flex items-center gap-2">
              <input
                type="radio"
                name="unit-system"
                value={s}
                checked={me.unitSystem === s}
                onChange={async () => {
                  setSaved(false);
                  await update.mutateAsync({ unitSystem: s });
                  setSaved(true);
                }}
              />
              {SYSTEM_LABELS[s]}
            </label>
          ))}
        </fieldset>
        {update.isError && <ErrorNote error={update.error} />}
        {saved && (
          <p role="status" className="mt-2 text-sm text-moss">
            Saved.
          </p>
        )}
      </section>
    </Page>
  );
}
