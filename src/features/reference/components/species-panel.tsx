import { Link } from 'react-router-dom';
import { paths } from '../../../config/paths';
import { useQuery } from '@tanstack/react-query';
import { useDeferredValue, useId, useState } from 'react';
import { SPECIES_ORIGINS, type SpeciesOrigin } from '../../../../shared/constants/records';
import type { Species } from '../../../../shared/schemas/reference';
import { ErrorNote, Loading } from '../../../components/ui/page';
import { useRole } from '../../../lib/session';
import { speciesListQuery } from '../../../lib/queries/reference';
import { dash } from '../../../lib/form-values';
import { useUnits } from '../../../lib/use-units';
import { SpeciesForm } from './species-form';
import { ORIGIN_LABELS } from './labels';

// Two decimals at least so a column of SGs lines up; a third when the source gives one.
const sg = (v: number | null) => (v === null ? '—' : v.toLocaleString('en', { minimumFractionDigits: 2, maximumFractionDigits: 3 }));

export function SpeciesPanel() {
  const { can } = useRole();
  const units = useUnits();
  const [q, setQ] = useState('');
  const [origin, setOrigin] = useState<SpeciesOrigin | ''>('');
  const deferredQ = useDeferredValue(q.trim());
  const list = useQuery(speciesListQuery({ q: deferredQ || undefined, origin: origin || undefined }));
  const [editing, setEditing] = useState<Species | 'new' | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const searchId = useId();
  const originId = useId();

  return (
    <section aria-labelledby="species-heading">
      <h2 id="species-heading" className="sr-only">
        Species
      </h2>
      <div className="mb-4 flex flex-wrap items-end gap-4">
        <div>
          <label htmlFor={searchId} className="field-label">
            Search by name
          </label>
          <input
            id={searchId}
            type="search"
            className="field-input w-72"
            value={q}
            onChange={(e) => setQ(e.target.value)}
            placeholder="common or botanical name"
          />
        </div>
        <div>
          <label htmlFor={originId} className="field-label">
            Origin
          </label>
          <select id={originId} className="field-input" value={origin} onChange={(e) => setOrigin(e.target.value as SpeciesOrigin | '')}>
            <option value="">Any origin</option>
            {SPECIES_ORIGINS.map((o) => (
              <option key={o} value={o}>
                {ORIGIN_LABELS[o]}
              </option>
            ))}
          </select>
        </div>
        {can('admin') && editing === null && (
          <button
            type="button"
            className="btn-primary"
            onClick={() => {
              setSaved(null);
              setEditing('new');
            }}
          >
            Add a species
          </button>
        )}
      </div>
      {saved && (
        <p role="status" className="mb-3 text-sm text-moss">
          Saved {saved}.
        </p>
      )}
      {can('admin') && editing !== null && (
        <SpeciesForm
          key={editing === 'new' ? 'new' : editing.id}
          species={editing === 'new' ? null : editing}
          onDone={(name) => {
            setEditing(null);
            setSaved(name);
          }}
          onCancel={() => setEditing(null)}
        />
      )}
      {list.isPending ? (
        <Loading />
      ) : list.isError ? (
        <ErrorNote error={list.error} />
      ) : (
        <>
          <p className="mb-2 text-sm text-ink-faint" role="status">
            {list.data.total === 1 ? '1 species' : `${list.data.total} species`}
            {deferredQ || origin ? ' match' : ''}
          </p>
          <div className="overflow-x-auto">
            <table className="data-table">
              <caption className="sr-only">Species with their reference densities, hardness and source</caption>
              <thead>
                <tr>
                  <th scope="col">Common name</th>
                  <th scope="col">Botanical name</th>
                  <th scope="col">Basic SG</th>
                  <th scope="col">SG at 12 % MC</th>
                  <th scope="col">Side hardness ({units.label('force')})</th>
                  <th scope="col">Shop-measured density</th>
                  <th scope="col">Origin</th>
                  <th scope="col">Source</th>
                  {can('admin') && (
                    <th scope="col">
                      <span className="sr-only">Actions</span>
                    </th>
                  )}
                </tr>
              </thead>
              <tbody>
                {list.data.items.map((s) => (
                  <tr key={s.id}>
                    <th scope="row" className="border-b border-paper-edge text-left font-normal text-ink">
                      {s.commonName}
                      <Link to={paths.compare.href({ speciesId: s.id })} className="ml-2 text-xs">
                        results<span className="sr-only"> for {s.commonName} in Compare</span>
                      </Link>
                    </th>
                    <td>
                      <i>{s.botanicalName}</i>
                    </td>
                    <td className="tabular-nums">{sg(s.basicSg)}</td>
                    <td className="tabular-nums">{sg(s.sg12)}</td>
                    <td className="tabular-nums">{units.format(s.sideHardnessN, 'force', false)}</td>
                    <td className="tabular-nums">
                      {s.measuredDensityKgM3 === null ? '—' : `${units.format(s.measuredDensityKgM3, 'density')} at ${dash(s.measuredMoisturePct)} % MC`}
                    </td>
                    <td>{ORIGIN_LABELS[s.origin]}</td>
                    <td className="max-w-xs text-xs text-ink-soft">{s.source}</td>
                    {can('admin') && (
                      <td>
                        <button
                          type="button"
                          className="btn-quiet"
                          onClick={() => {
                            setSaved(null);
                            setEditing(s);
                          }}
                        >
                          Edit<span className="sr-only"> {s.commonName}</span>
                        </button>
                      </td>
                    )}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {list.data.items.length === 0 && <p className="mt-3 text-ink-soft">No species match.</p>}
        </>
      )}
    </section>
  );
}
