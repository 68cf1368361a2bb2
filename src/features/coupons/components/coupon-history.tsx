import { useQuery } from '@tanstack/react-query';
import type { z } from 'zod';
import { useState } from 'react';
import { HARDNESS_SCALES } from '../../../../shared/constants/records';
import { decimalsToSeeChange, type Quantity } from '../../../../shared/units';
import type { auditEntrySchema, CheckOut, WeighingOut } from '../../../../shared/schemas/coupons';
import { ErrorNote, Loading } from '../../../components/ui/page';
import { useUnits, type Units } from '../../../lib/use-units';
import { couponHistoryQuery } from '../api/coupons-queries';
import { formatDateTime } from '../../../lib/format/dates';

type AuditEntry = z.infer<typeof auditEntrySchema>;

const when = formatDateTime;

const ACTION_WORDS: Record<string, string> = {
  create: 'entered',
  correct: 'corrected',
  delete: 'deleted',
  update: 'changed',
  'assign-run': 'put in a run',
  'remove-from-run': 'taken out of a run',
  commit: 'imported',
  undo: 'undid',
};

function record(v: unknown): Record<string, unknown> | null {
  return v && typeof v === 'object' ? (v as Record<string, unknown>) : null;
}

/**
 * The measured values an audit row holds, in the user's units, for a before → after line. Given the
 * other side of a correction, each value shows enough decimals to see the correction's size
 * (25.1 g → 25.12 g rather than 25.1 g → 25.1 g).
 */
function valuesOf(v: unknown, u: Units, other?: unknown): string {
  const r = record(v);
  if (!r) return '';
  const o = record(other);
  const out: string[] = [];
  const n = (rec: Record<string, unknown> | null, k: string) => (rec && typeof rec[k] === 'number' ? (rec[k] as number) : null);
  const show = (k: string, q: Quantity) => {
    const value = n(r, k) as number;
    const theirs = n(o, k);
    const decimals = theirs === null ? undefined : decimalsToSeeChange(u.toDisplay(value, q), u.toDisplay(theirs, q), u.decimals(q));
    return u.format(value, q, true, { decimals });
  };
  if (n(r, 'massG') !== null) out.push(show('massG', 'mass'));
  for (const [k, label] of [
    ['lengthMm', 'L'],
    ['widthMm', 'W'],
    ['thicknessMm', 'T'],
  ] as const)
    if (n(r, k) !== null) out.push(`${label} ${show(k, 'length')}`);
  if (n(r, 'volumeCm3') !== null) out.push(show('volumeCm3', 'volume'));
  if (n(r, 'hardnessValue') !== null) {
    const scale = HARDNESS_SCALES.find((s) => s === r.hardnessScale);
    out.push(scale ? u.hardness(n(r, 'hardnessValue'), scale) : String(n(r, 'hardnessValue')));
  }
  if (n(r, 'moisturePct') !== null) out.push(`${n(r, 'moisturePct')} % MC`);
  if (typeof r.runCode === 'string') out.push(`run ${r.runCode}`);
  return out.join(', ');
}

function Entry({ e }: { e: AuditEntry }) {
  const u = useUnits();
  const before = valuesOf(e.before, u, e.after);
  const after = valuesOf(e.after, u, e.before);
  const stage = record(e.after)?.stage ?? record(e.before)?.stage;
  const kind = e.entity === 'check' ? (record(e.after)?.kind ?? record(e.before)?.kind) : null;
  const what = e.entity === 'check' && typeof kind === 'string' ? `${kind} check` : e.entity;
  const file = record(e.after)?.file;
  // An import is audited once for all its coupons; its own rows are in the weighings above.
  const subject =
    e.entity === 'import'
      ? e.action === 'undo'
        ? `import ${e.entityId}`
        : `readings from a file (import ${e.entityId}${typeof file === 'string' ? `, ${file}` : ''})`
      : e.entity === 'coupon'
        ? 'the coupon'
        : `a ${typeof stage === 'string' ? `${stage} ` : ''}${what}`;
  return (
    <li className="py-2 text-sm">
      <p>
        <time dateTime={e.createdAt}>{when(e.createdAt)}</time> · {e.actorName ?? 'someone'}
        {e.actorEmail ? ` (${e.actorEmail})` : ''} {ACTION_WORDS[e.action] ?? e.action} {subject}
      </p>
      {(before || after) && (
        <p className="text-ink-soft">
          {before && e.action !== 'create' ? (
            <>
              <del>{before}</del> → {after || 'nothing'}
            </>
          ) : (
            after
          )}
        </p>
      )}
      {e.reason && <p>Reason: “{e.reason}”</p>}
    </li>
  );
}

function Superseded({ weighings, checks, audit }: { weighings: WeighingOut[]; checks: CheckOut[]; audit: AuditEntry[] }) {
  const u = useUnits();
  const reason = (entity: string, id: number) => audit.filter((a) => a.entity === entity && a.entityId === String(id) && a.reason).at(-1)?.reason ?? null;
  const old = [
    ...weighings
      .filter((w) => w.supersededBy !== null || w.deletedAt !== null)
      .map((w) => ({ key: `w${w.id}`, what: `${w.stage} weighing ${u.format(w.massG, 'mass')}`, w, reason: reason('weighing', w.id) })),
    ...checks
      .filter((c) => c.supersededBy !== null || c.deletedAt !== null)
      .map((c) => ({ key: `c${c.id}`, what: `${c.stage} ${c.kind} check ${valuesOf(c, u)}`, w: c, reason: reason('check', c.id) })),
  ];
  if (old.length === 0) return <p className="text-sm text-ink-soft">No value has been corrected or deleted.</p>;
  return (
    <ul className="divide-y divide-paper-edge text-sm">
      {old.map((o) => (
        <li key={o.key} className="py-1">
          <del>{o.what}</del> — {o.w.deletedAt ? `deleted ${when(o.w.deletedAt)}` : 'superseded by a correction'}
          {o.reason ? `; reason: “${o.reason}”` : ''}
        </li>
      ))}
    </ul>
  );
}

export function CouponHistoryPanel({ couponId }: { couponId: number }) {
  const history = useQuery(couponHistoryQuery(couponId));
  const [newestFirst, setNewestFirst] = useState(true);
  return (
    <section aria-labelledby="history-heading" className="sheet mt-6 p-3 sm:p-5">
      <h2 id="history-heading" className="mb-2">
        History
      </h2>
      {history.isPending ? (
        <Loading />
      ) : history.isError ? (
        <ErrorNote error={history.error} />
      ) : (
        <div className="grid gap-6 lg:grid-cols-2">
          <div>
            <h3 className="font-semibold">Replaced values</h3>
            <Superseded weighings={history.data.weighings} checks={history.data.checks} audit={history.data.audit} />
          </div>
          <div>
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <h3 className="font-semibold">Every change, {newestFirst ? 'newest' : 'oldest'} first</h3>
              <button type="button" className="btn-quiet min-h-6 px-2 py-0.5 text-xs" onClick={() => setNewestFirst((v) => !v)}>
                Show {newestFirst ? 'oldest' : 'newest'} first
              </button>
            </div>
            {history.data.audit.length === 0 ? (
              <p className="text-sm text-ink-soft">Nothing recorded yet.</p>
            ) : (
              <ol className="divide-y divide-paper-edge">
                {(newestFirst ? [...history.data.audit].reverse() : history.data.audit).map((e) => (
                  <Entry key={e.id} e={e} />
                ))}
              </ol>
            )}
          </div>
        </div>
      )}
    </section>
  );
}
