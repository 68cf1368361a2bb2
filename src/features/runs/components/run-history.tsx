import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import type { RunHistoryEntry } from '../../../../shared/schemas/runs';
import { STAGE_LABELS } from '../../../../shared/runs/stages';
import { decimalsToSeeChange } from '../../../../shared/units';
import { ErrorNote, Loading } from '../../../components/ui/page';
import { useUnits, type Units } from '../../../lib/use-units';
import { runHistoryQuery } from '../api/use-correct-stage';
import { dateTime } from './time-text';

const ACTION_WORDS: Record<string, string> = { create: 'recorded', update: 'added to', correct: 'corrected' };

function record(v: unknown): Record<string, unknown> {
  return v && typeof v === 'object' ? (v as Record<string, unknown>) : {};
}

/** "field: before → after" for each value a change touched, in the user's units and with the digits that show it. */
function changes(before: unknown, after: unknown, u: Units): string[] {
  const b = record(before);
  const a = record(after);
  const out: string[] = [];
  const time = (v: unknown) => (typeof v === 'string' ? dateTime(v) : 'none');
  for (const [k, words] of [
    ['startedAt', 'start'],
    ['endedAt', 'end'],
    ['bubblingStoppedAt', 'bubbling stopped'],
  ] as const) {
    if (k in a && a[k] !== b[k]) out.push(`${words}: ${k in b ? `${time(b[k])} → ` : ''}${time(a[k])}`);
  }
  for (const [k, words, q] of [
    ['barometerKpa', 'shop barometer', 'pressure'],
    ['ovenSetC', 'oven set point', 'temperature'],
    ['ovenMeasuredC', 'oven thermometer', 'temperature'],
  ] as const) {
    if (!(k in a) || a[k] === b[k]) continue;
    const was = typeof b[k] === 'number' ? (b[k] as number) : null;
    const now = typeof a[k] === 'number' ? (a[k] as number) : null;
    // A stage recorded without this value (a vacuum has no oven) says nothing about it.
    if (was === null && now === null) continue;
    const d = was !== null && now !== null ? decimalsToSeeChange(u.toDisplay(was, q), u.toDisplay(now, q), 1) : undefined;
    out.push(
      `${words}: ${k in b ? `${was === null ? 'none' : u.format(was, q, true, { decimals: d })} → ` : ''}${now === null ? 'none' : u.format(now, q, true, { decimals: d })}`,
    );
  }
  const readings = (v: unknown) =>
    (Array.isArray(v) ? v : []).map((r) => record(r)).map((r) => `${String(r.gaugeValue)} ${String(r.gaugeUnit)} at ${time(r.at)}`);
  const rb = readings(b.readings).join('; ');
  const ra = readings(a.readings ?? a.readingsAdded).join('; ');
  if ('readings' in b && rb !== ra) out.push(`gauge readings: ${rb || 'none'} → ${ra || 'none'}`);
  else if (!('readings' in b) && ra) out.push(`gauge readings: ${ra}`);
  return out;
}

function Entry({ e }: { e: RunHistoryEntry }) {
  const u = useUnits();
  const what = e.stage ? `the ${STAGE_LABELS[e.stage].toLowerCase()} stage` : 'the run';
  const lines = e.entity === 'run_stage' ? changes(e.action === 'create' ? {} : e.before, e.after, u) : [];
  return (
    <li className="py-2 text-sm">
      <p>
        <time dateTime={e.createdAt}>{dateTime(e.createdAt)}</time> · {e.actorName ?? 'someone'} {ACTION_WORDS[e.action] ?? e.action} {what}
      </p>
      {lines.length > 0 && (
        <ul className="text-ink-soft">
          {lines.map((l) => (
            <li key={l}>{l}</li>
          ))}
        </ul>
      )}
      {e.reason && <p>Reason: “{e.reason}”</p>}
    </li>
  );
}

/** The run's history: every change to its record, newest first (or oldest first), with the reasons of corrections. */
export function RunHistoryPanel({ runId }: { runId: number }) {
  const history = useQuery(runHistoryQuery(runId));
  const [newestFirst, setNewestFirst] = useState(true);
  return (
    <section aria-labelledby="run-history-heading" className="sheet mt-6 p-3 sm:p-5">
      <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="run-history-heading">History, {newestFirst ? 'newest' : 'oldest'} first</h2>
        <button type="button" className="btn-quiet min-h-6 px-2 py-0.5 text-xs" onClick={() => setNewestFirst((v) => !v)}>
          Show {newestFirst ? 'oldest' : 'newest'} first
        </button>
      </div>
      {history.isPending ? (
        <Loading />
      ) : history.isError ? (
        <ErrorNote error={history.error} />
      ) : history.data.entries.length === 0 ? (
        <p className="text-sm text-ink-soft">Nothing recorded yet.</p>
      ) : (
        <ol className="divide-y divide-paper-edge">
          {(newestFirst ? history.data.entries : [...history.data.entries].reverse()).map((e) => (
            <Entry key={e.id} e={e} />
          ))}
        </ol>
      )}
    </section>
  );
}
