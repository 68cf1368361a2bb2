import { useEffect, useId, useRef, useState } from 'react';
import { readBalanceLine, type BalanceSettings } from '../../../../shared/imports/balance-stream';
import { IMPORT_MASS_UNITS, type ImportMassUnit } from '../../../../shared/imports/mass-units';
import { BAUD_RATES, connectBalance, serialSupported, type BalanceConnection } from '../../../lib/balance/web-serial';

export interface BalanceOutcome {
  text: string;
  bad: boolean;
}

/**
 * Weighing straight into the grid from a balance on a USB-serial cable. Each settled reading goes into the
 * selected mass cell (typed, not saved: Save sends it with the rest), and the cell below is selected, so
 * a technician weighs down a column without touching the keyboard. Readings the balance marks as
 * settling are left out; what happened to each reading is said in the status line.
 */
export function BalancePanel({ onMass }: { onMass: (grams: number, printed: string) => BalanceOutcome }) {
  const supported = serialSupported();
  const [baudRate, setBaudRate] = useState<number>(9600);
  const [settings, setSettings] = useState<BalanceSettings>({ decimal: '.', unitWhenNone: 'g' });
  const [connection, setConnection] = useState<BalanceConnection | null>(null);
  const [status, setStatus] = useState<BalanceOutcome | null>(null);
  const ids = useId();
  // The line handler outlives renders (it is set once per connection); it reads the latest settings and grid.
  const latest = useRef({ settings, onMass });
  latest.current = { settings, onMass };

  useEffect(
    () => () => {
      void connection?.close();
    },
    [connection],
  );

  const connect = async () => {
    try {
      const c = await connectBalance({
        baudRate,
        onLine: (line) => {
          const read = readBalanceLine(line, latest.current.settings);
          if (read.kind === 'blank') return;
          if (read.kind === 'unstable') setStatus({ text: `${read.printed}: still settling, left out; wait for a settled reading.`, bad: false });
          else if (read.kind === 'refused') setStatus({ text: `${read.printed}: not written. ${read.why}.`, bad: true });
          else setStatus(latest.current.onMass(read.grams, read.printed));
        },
        onEnd: (error) => {
          setConnection(null);
          setStatus(error ? { text: `The balance was disconnected: ${error.message}`, bad: true } : { text: 'The balance is disconnected.', bad: false });
        },
      });
      setConnection(c);
      setStatus({ text: `Balance connected at ${baudRate} baud. Select a mass cell and press the balance's print key.`, bad: false });
    } catch (err) {
      // Closing the browser's port chooser without a pick is not an error worth a red line.
      const name = err instanceof Error ? err.name : '';
      setStatus(
        name === 'NotFoundError'
          ? { text: 'No port picked.', bad: false }
          : { text: `Not connected: ${err instanceof Error ? err.message : String(err)}`, bad: true },
      );
    }
  };

  return (
    <details className="no-print mb-3 rounded border border-paper-edge px-3 py-2 text-sm">
      <summary className="cursor-pointer font-medium">Weigh into the grid from a balance{connection ? ' (connected)' : ''}</summary>
      {!supported ? (
        <p className="mt-2 text-ink-soft">
          A balance on a USB-serial cable can write its readings straight into the grid in a Chromium-based browser on the computer it is plugged into. This
          browser cannot reach a serial port; a balance that types like a keyboard works here as it is.
        </p>
      ) : (
        <div className="mt-2 space-y-2">
          <p className="text-ink-soft">
            Set the balance to send a reading when its print key is pressed (or continuously: readings it marks as settling are left out). Each settled reading
            goes into the selected mass cell, and the cell below is selected next. Nothing is saved until you press Save.
          </p>
          <div className="flex flex-wrap items-end gap-3">
            <label className="flex flex-col" htmlFor={`${ids}-baud`}>
              <span className="field-label">Speed (baud)</span>
              <select
                id={`${ids}-baud`}
                className="field-input"
                value={baudRate}
                disabled={connection !== null}
                onChange={(e) => setBaudRate(Number(e.target.value))}
              >
                {BAUD_RATES.map((b) => (
                  <option key={b} value={b}>
                    {b}
                  </option>
                ))}
              </select>
            </label>
            <label className="flex flex-col" htmlFor={`${ids}-decimal`}>
              <span className="field-label">Decimal mark</span>
              <select
                id={`${ids}-decimal`}
                className="field-input"
                value={settings.decimal}
                onChange={(e) => setSettings({ ...settings, decimal: e.target.value === ',' ? ',' : '.' })}
              >
                <option value=".">point (12.345)</option>
                <option value=",">comma (12,345)</option>
              </select>
            </label>
            <label className="flex flex-col" htmlFor={`${ids}-unit`}>
              <span className="field-label">Unit when the balance prints none</span>
              <select
                id={`${ids}-unit`}
                className="field-input"
                value={settings.unitWhenNone}
                onChange={(e) => setSettings({ ...settings, unitWhenNone: e.target.value as ImportMassUnit })}
              >
                {IMPORT_MASS_UNITS.map((u) => (
                  <option key={u} value={u}>
                    {u}
                  </option>
                ))}
              </select>
            </label>
            {connection ? (
              <button type="button" className="btn-quiet" onClick={() => void connection.close()}>
                Disconnect the balance
              </button>
            ) : (
              <button type="button" className="btn-quiet" onClick={() => void connect()}>
                Connect a balance…
              </button>
            )}
          </div>
        </div>
      )}
      <p role="status" aria-live="polite" className={`mt-2 ${status?.bad ? 'text-margin' : 'text-moss'}`}>
        {status?.text}
      </p>
    </details>
  );
}
