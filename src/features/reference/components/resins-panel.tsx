import { Link } from 'react-router-dom';
import { paths } from '../../../config/paths';
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import type { Resin } from '../../../../shared/schemas/reference';
import { ErrorNote, Loading } from '../../../components/ui/page';
import { useRole } from '../../../lib/session';
import { useUnits } from '../../../lib/use-units';
import { resinListQuery } from '../../../lib/queries/reference';
import { ResinForm } from './resin-form';

export function ResinsPanel() {
  const { can } = useRole();
  const units = useUnits();
  const list = useQuery(resinListQuery());
  const [editing, setEditing] = useState<Resin | 'new' | null>(null);
  const [saved, setSaved] = useState<string | null>(null);

  return (
    <section aria-labelledby="resins-heading">
      <div className="mb-4 flex flex-wrap items-center justify-between gap-3">
        <h2 id="resins-heading">Resins</h2>
        {can('admin') && editing === null && (
          <button
            type="button"
            className="btn-primary"
            onClick={() => {
              setSaved(null);
              setEditing('new');
            }}
          >
            Add a resin
          </button>
        )}
      </div>
      {saved && (
        <p role="status" className="mb-3 text-sm text-moss">
          Saved {saved}.
        </p>
      )}
      {can('admin') && editing !== null && (
        <ResinForm
          key={editing === 'new' ? 'new' : editing.id}
          resin={editing === 'new' ? null : editing}
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
      ) : list.data.items.length === 0 ? (
        <p className="text-ink-soft">No resins yet.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="data-table">
            <caption className="sr-only">Resins with their densities, cure window and shelf life</caption>
            <thead>
              <tr>
                <th scope="col">Name</th>
                <th scope="col">Kind</th>
                <th scope="col">Liquid density ({units.label('density')})</th>
                <th scope="col">Cured density ({units.label('density')})</th>
                <th scope="col">Cure window</th>
                <th scope="col">Shelf life once activated</th>
                <th scope="col">Usable lots</th>
                {can('admin') && (
                  <th scope="col">
                    <span className="sr-only">Actions</span>
                  </th>
                )}
              </tr>
            </thead>
            <tbody>
              {list.data.items.map((r) => (
                <tr key={r.id}>
                  <th scope="row" className="border-b border-paper-edge text-left font-normal text-ink">
                    {r.name}
                    <Link to={paths.compare.href({ resinId: r.id })} className="ml-2 text-xs">
                      results<span className="sr-only"> for {r.name} in Compare</span>
                    </Link>
                  </th>
                  <td>{r.kind}</td>
                  <td className="tabular-nums">{units.format(r.liquidDensityGcm3 * 1000, 'density', false)}</td>
                  <td className="tabular-nums">{units.format(r.curedDensityGcm3 * 1000, 'density', false)}</td>
                  <td className="tabular-nums whitespace-nowrap">
                    {units.format(r.cureMinC, 'temperature', false)}–{units.format(r.cureMaxC, 'temperature')}
                  </td>
                  <td className="tabular-nums">{r.shelfLifeDays} days</td>
                  <td className="tabular-nums">{r.usableLots}</td>
                  {can('admin') && (
                    <td>
                      <button
                        type="button"
                        className="btn-quiet"
                        onClick={() => {
                          setSaved(null);
                          setEditing(r);
                        }}
                      >
                        Edit<span className="sr-only"> {r.name}</span>
                      </button>
                    </td>
                  )}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}
