import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { LOT_STATUSES, type LotStatus } from '../../../../shared/constants/records';
import { ErrorNote, Loading } from '../../../components/ui/page';
import { useRole } from '../../../lib/session';
import { useUnits } from '../../../lib/use-units';
import { lotListQuery } from '../../../lib/queries/reference';
import { isoDay } from '../../../lib/form-values';
import { ActivateLotForm } from './activate-lot-form';
import { LotChangeForm } from './lot-change-form';
import { LotExpiryMark } from './lot-expiry';
import { LOT_STATUS_LABELS } from './labels';

export function LotsPanel() {
  const { can } = useRole();
  const units = useUnits();
  const [status, setStatus] = useState<LotStatus | ''>('');
  const lots = useQuery(lotListQuery({ status: status || undefined }));
  const [activating, setActivating] = useState(false);
  const [changing, setChanging] = useState<number | null>(null);
  const [saved, setSaved] = useState<string | null>(null);

  return (
    <section aria-labelledby="lots-heading">
      <div className="mb-4 flex flex-wrap items-end justify-between gap-3">
        <h2 id="lots-heading">Resin lots</h2>
        <div className="flex flex-wrap items-end gap-3">
          <div>
            <label htmlFor="lot-status-filter" className="field-label">
              Show
            </label>
            <select id="lot-status-filter" className="field-input" value={status} onChange={(e) => setStatus(e.target.value as LotStatus | '')}>
              <option value="">Every lot</option>
              {LOT_STATUSES.map((s) => (
                <option key={s} value={s}>
                  {LOT_STATUS_LABELS[s]} lots
                </option>
              ))}
            </select>
          </div>
          {can('technician') && !activating && (
            <button
              type="button"
              className="btn-primary"
              onClick={() => {
                setSaved(null);
                setActivating(true);
              }}
            >
              Activate a new lot
            </button>
          )}
        </div>
      </div>
      {saved && (
        <p role="status" className="mb-3 text-sm text-moss">
          {saved}
        </p>
      )}
      {can('technician') && activating && (
        <ActivateLotForm
          onDone={(code) => {
            setActivating(false);
            setSaved(`Lot ${code} recorded.`);
          }}
          onCancel={() => setActivating(false)}
        />
      )}
      {lots.isPending ? (
        <Loading />
      ) : lots.isError ? (
        <ErrorNote error={lots.error} />
      ) : (
        <>
          {can('technician') && changing !== null && (
            <LotChangeForm
              key={changing}
              lots={lots.data.items}
              initialLotId={changing}
              onDone={(code) => {
                setChanging(null);
                setSaved(`Lot ${code} changed.`);
              }}
              onCancel={() => setChanging(null)}
            />
          )}
          {lots.data.items.length === 0 ? (
            <p className="text-ink-soft">No lots{status ? ' with that status' : ''}.</p>
          ) : (
            <div className="overflow-x-auto">
              <table className="data-table">
                <caption className="sr-only">Resin lots with their age, shelf life, reuses and the species that went through them</caption>
                <thead>
                  <tr>
                    <th scope="col">Lot</th>
                    <th scope="col">Resin</th>
                    <th scope="col">Activated on</th>
                    <th scope="col">Age</th>
                    <th scope="col">Expires on</th>
                    <th scope="col">Volume</th>
                    <th scope="col">Reuses</th>
                    <th scope="col">Status</th>
                    <th scope="col">Catalyst and dye</th>
                    <th scope="col">Species through the lot</th>
                    {can('technician') && (
                      <th scope="col">
                        <span className="sr-only">Actions</span>
                      </th>
                    )}
                  </tr>
                </thead>
                <tbody>
                  {lots.data.items.map((l) => (
                    <tr key={l.id}>
                      <th scope="row" className="border-b border-paper-edge text-left font-normal whitespace-nowrap text-ink">
                        {l.code}
                      </th>
                      <td>{l.resinName}</td>
                      <td className="tabular-nums whitespace-nowrap">{isoDay(l.activatedAt)}</td>
                      <td className="tabular-nums whitespace-nowrap">{l.ageDays === 1 ? '1 day' : `${l.ageDays} days`}</td>
                      <td className="tabular-nums">
                        {l.expiresOn} <LotExpiryMark lot={l} />
                      </td>
                      <td className="tabular-nums whitespace-nowrap">{units.format(l.volumeMl, 'liquidVolume')}</td>
                      <td className="tabular-nums">{l.reuseCount}</td>
                      <td>{LOT_STATUS_LABELS[l.status]}</td>
                      <td className="max-w-xs text-xs">
                        {l.catalystNotes && <div>Catalyst: {l.catalystNotes}</div>}
                        {l.dyeNotes && <div>Dye: {l.dyeNotes}</div>}
                        {!l.catalystNotes && !l.dyeNotes && '—'}
                      </td>
                      <td className="max-w-xs text-xs">{l.speciesThroughLot.length ? l.speciesThroughLot.join(', ') : 'None yet'}</td>
                      {can('technician') && (
                        <td>
                          <button
                            type="button"
                            className="btn-quiet"
                            onClick={() => {
                              setSaved(null);
                              setChanging(l.id);
                            }}
                          >
                            Change<span className="sr-only"> lot {l.code}</span>
                          </button>
                        </td>
                      )}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </>
      )}
    </section>
  );
}
