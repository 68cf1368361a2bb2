import { useState } from 'react';
import { QUANTITIES, UNIT_SYSTEMS_LIST, type Quantity, type UnitSystemName } from '../../../../shared/constants/units';
import { ROLE_LABELS } from '../../../../shared/constants/roles';
import { QUANTITY_LABELS, UNITS_OF, UNIT_LABELS, formatQuantity, presetOf, type UnitPrefs } from '../../../../shared/units';
import type { UpdatePreferencesInput } from '../../../../shared/schemas/auth';
import { ErrorNote, Page } from '../../../components/ui/page';
import { useUpdatePreferences } from '../api/use-auth-mutations';
import { useMe } from '../../../lib/session';

const SYSTEM_LABELS: Record<UnitSystemName, string> = {
  metric: 'Metric — g, mm, °C, kPa, kg/m³',
  us: 'US customary — oz, in, °F, inHg, lb/ft³',
};

/** A sample value per quantity (stored, SI) to show what each choice looks like. */
const SAMPLE: Record<Quantity, number> = {
  mass: 25.1,
  length: 12.7,
  temperature: 110,
  pressure: 96.5,
  volume: 32.8,
  liquidVolume: 1900,
  density: 545,
  altitude: 1600,
  force: 5740,
};

export function PreferencesScreen() {
  const me = useMe();
  const update = useUpdatePreferences();
  const [saved, setSaved] = useState<string | null>(null);
  if (!me) return null;
  const preset = presetOf(me.units);
  const save = async (input: UpdatePreferencesInput, what: string) => {
    setSaved(null);
    await update.mutateAsync(input);
    setSaved(what);
  };
  return (
    <Page title="Your preferences">
      <section className="sheet max-w-2xl p-5">
        <p className="mb-4 text-sm text-ink-soft">
          Signed in as {me.name} ({me.email}), {ROLE_LABELS[me.role]}.
        </p>
        <fieldset className="mb-5">
          <legend className="field-label mb-2">Display units: start from</legend>
          <p className="mb-3 text-xs text-ink-faint">
            Measurements are stored in SI units; this only changes how they are shown, typed, exported and mailed. Choosing a preset sets every quantity below;
            then change any single one (a US shop with a gram scale: US customary, then mass in g).
          </p>
          {UNIT_SYSTEMS_LIST.map((s) => (
            <label key={s} className="mb-2 flex items-center gap-2">
              <input
                type="radio"
                name="unit-system"
                value={s}
                checked={preset === s}
                onChange={() => void save({ unitSystem: s }, `Every quantity now in ${s === 'us' ? 'US customary' : 'metric'} units.`)}
              />
              {SYSTEM_LABELS[s]}
            </label>
          ))}
          {preset === null && <p className="text-sm text-ink-soft">Now: your own mix, starting from {me.unitSystem === 'us' ? 'US customary' : 'metric'}.</p>}
        </fieldset>
        <table className="w-full text-sm" aria-label="Unit for each quantity">
          <thead>
            <tr>
              <th scope="col" className="text-left">
                Quantity
              </th>
              <th scope="col" className="text-left">
                Unit
              </th>
              <th scope="col" className="text-left">
                Looks like
              </th>
            </tr>
          </thead>
          <tbody>
            {QUANTITIES.map((q) => (
              <QuantityRow
                key={q}
                quantity={q}
                prefs={me.units}
                onChange={(unit) => void save({ units: { [q]: unit } }, `${QUANTITY_LABELS[q]} now in ${UNIT_LABELS[unit]}.`)}
              />
            ))}
          </tbody>
        </table>
        <p className="mt-3 text-xs text-ink-faint">Shore D and Brinell hardness are shown as measured: they are scales, never converted into one another.</p>
        {update.isError && <ErrorNote error={update.error} />}
        {saved && (
          <p role="status" className="mt-2 text-sm text-moss">
            Saved. {saved}
          </p>
        )}
      </section>
    </Page>
  );
}

function QuantityRow({ quantity, prefs, onChange }: { quantity: Quantity; prefs: UnitPrefs; onChange: (unit: UnitPrefs[Quantity]) => void }) {
  const id = `unit-${quantity}`;
  return (
    <tr>
      <th scope="row" className="py-1 pr-3 text-left font-normal">
        <label htmlFor={id}>{QUANTITY_LABELS[quantity]}</label>
      </th>
      <td className="py-1 pr-3">
        <select id={id} className="field-input" value={prefs[quantity]} onChange={(e) => onChange(e.target.value as UnitPrefs[Quantity])}>
          {UNITS_OF[quantity].map((u) => (
            <option key={u} value={u}>
              {UNIT_LABELS[u]}
            </option>
          ))}
        </select>
      </td>
      <td className="py-1 tabular-nums text-ink-soft">{formatQuantity(SAMPLE[quantity], quantity, prefs)}</td>
    </tr>
  );
}
