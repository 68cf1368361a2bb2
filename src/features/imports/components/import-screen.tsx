import { useQuery } from '@tanstack/react-query';
import { useEffect, useRef, useState, type FormEvent } from 'react';
import { Link, useParams } from 'react-router-dom';
import type { ImportDetail } from '../../../../shared/schemas/imports';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { idParam } from '../../../lib/routing';
import { useRole } from '../../../lib/session';
import { useUnits } from '../../../lib/use-units';
import { useInvalidate } from '../../../lib/queries/invalidate';
import { importProblemsQuery, importQuery, isBusy, PROBLEMS_PAGE } from '../api/imports-queries';
import { useUndo } from '../api/use-import-actions';
import { MappingForm } from './mapping-form';
import { ProgressBar } from './progress-bar';
import { bytesText, STATUS_LABELS, whenText } from './imports-screen';

const OUTCOME_LABELS = { accepted: 'accepted', skipped: 'skipped', problem: 'problem' } as const;

function Facts({ d }: { d: ImportDetail }) {
  return (
    <dl className="mb-6 grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 text-sm">
      <dt className="text-ink-soft">File</dt>
      <dd>
        {d.originalName} · {bytesText(d.bytes)} · SHA-256 <span className="font-mono text-xs">{d.sha256.slice(0, 16)}…</span>
      </dd>
      <dt className="text-ink-soft">Uploaded</dt>
      <dd>
        {whenText(d.createdAt)} by {d.createdByName ?? '—'}
      </dd>
      <dt className="text-ink-soft">State</dt>
      <dd>
        <strong>{STATUS_LABELS[d.status]}</strong>
        {d.committedAt && ` · imported ${whenText(d.committedAt)}`}
        {d.undoneAt && ` · undone ${whenText(d.undoneAt)} by ${d.undoneByName ?? '—'}: ${d.undoReason ?? ''}`}
      </dd>
    </dl>
  );
}

function Problems({ id, total }: { id: number; total: number }) {
  const [page, setPage] = useState(1);
  const q = useQuery(importProblemsQuery(id, page));
  if (total === 0) return null;
  return (
    <section aria-labelledby="problems-heading" className="mt-6">
      <h3 id="problems-heading" className="mb-2 font-semibold">
        Rows not imported as they stand
      </h3>
      {q.isPending ? (
        <Loading />
      ) : q.isError ? (
        <ErrorNote error={q.error} />
      ) : (
        <>
          <table className="data-table">
            <caption className="sr-only">Each row with its column and the reason</caption>
            <thead>
              <tr>
                <th scope="col">Row</th>
                <th scope="col">Column</th>
                <th scope="col">Outcome</th>
                <th scope="col">Reason</th>
                <th scope="col">The row</th>
              </tr>
            </thead>
            <tbody>
              {q.data.items.map((p, i) => (
                <tr key={`${p.row}-${i}`}>
                  <td>{p.row === 0 ? 'end of file' : p.row}</td>
                  <td>{p.column ?? '—'}</td>
                  <td>{OUTCOME_LABELS[p.outcome]}</td>
                  <td>{p.message}</td>
                  <td className="max-w-xs truncate font-mono text-xs" title={p.cells.join(' | ')}>
                    {p.cells.join(' | ')}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          <div className="mt-2 flex flex-wrap items-center gap-2 text-sm">
            {q.data.total > PROBLEMS_PAGE && (
              <>
                <button type="button" className="btn-quiet" disabled={page === 1} onClick={() => setPage(page - 1)}>
                  Earlier rows
                </button>
                <button type="button" className="btn-quiet" disabled={page * PROBLEMS_PAGE >= q.data.total} onClick={() => setPage(page + 1)}>
                  Later rows
                </button>
              </>
            )}
            <a href={`/api/imports/${id}/problems.csv`} download>
              Download these rows as CSV
            </a>
          </div>
        </>
      )}
    </section>
  );
}

function Preview({ d }: { d: ImportDetail }) {
  const units = useUnits();
  const c = d.counts;
  if (!c) return null;
  return (
    <section aria-labelledby="preview-heading" className="sheet mt-8 p-5">
      <h2 id="preview-heading" className="mb-3">
        {d.status === 'committed' || d.status === 'undone' ? 'What was imported' : 'Preview'}
      </h2>
      <p className="mb-3" role="status">
        {c.rows} rows read: <strong>{c.accepted} accepted</strong>
        {c.corrections ? `, ${c.corrections} corrections` : ''}, {c.skipped} skipped, <strong>{c.problems} with problems</strong>.
      </p>
      {d.error && <ErrorNote error={new Error(d.error)} />}
      {d.previewRows.length > 0 && (
        <table className="data-table">
          <caption className="mb-1 text-left text-sm text-ink-soft">The first readings as they will be stored</caption>
          <thead>
            <tr>
              <th scope="col">Row</th>
              <th scope="col">Coupon</th>
              <th scope="col">Stage</th>
              <th scope="col">Mass</th>
              <th scope="col">Weighed</th>
            </tr>
          </thead>
          <tbody>
            {d.previewRows.map((r) => (
              <tr key={r.row}>
                <td>{r.row}</td>
                <td>
                  <Link to={paths.coupon.href({ id: r.couponId })}>{r.tag}</Link>
                </td>
                <td>
                  {r.stage}
                  {r.correction ? ' (correction)' : ''}
                </td>
                <td>{units.format(r.massG, 'mass')}</td>
                <td>{whenText(r.measuredAt)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      <Problems id={d.id} total={c.skipped + c.problems} />
    </section>
  );
}

function UndoForm({ d }: { d: ImportDetail }) {
  const undo = useUndo(d.id);
  const [reason, setReason] = useState('');
  const submit = (e: FormEvent) => {
    e.preventDefault();
    undo.mutate(reason);
  };
  return (
    <form onSubmit={submit} className="sheet mt-8 max-w-2xl p-5" aria-labelledby="undo-heading">
      <h2 id="undo-heading" className="mb-2">
        Undo this import
      </h2>
      <p className="mb-3 text-sm text-ink-soft">Its weighings are withdrawn, not erased: each coupon's history keeps them with your name and reason.</p>
      <label htmlFor="undo-reason" className="field-label">
        Why
      </label>
      <input id="undo-reason" className="field-input" value={reason} onChange={(e) => setReason(e.target.value)} />
      {undo.isError && (
        <div className="mt-2">
          <ErrorNote error={undo.error} />
        </div>
      )}
      <button type="submit" className="btn-quiet mt-3" disabled={undo.isPending}>
        Undo import
      </button>
    </form>
  );
}

export function ImportScreen() {
  const id = idParam(useParams());
  const { can } = useRole();
  const q = useQuery({ ...importQuery(id ?? 0), enabled: id !== null });
  // A job's writes (a commit's or an undo's) become visible when it ends, not when it was asked for: the
  // coupons, runs and results read meanwhile are read again then.
  const invalidate = useInvalidate();
  const busy = isBusy(q.data);
  const wasBusy = useRef(busy);
  useEffect(() => {
    if (wasBusy.current && !busy) void invalidate('imports');
    wasBusy.current = busy;
  }, [busy, invalidate]);
  if (id === null) return <Page title="Import">{<p>There is no import at this address.</p>}</Page>;
  if (q.isPending) return <Page title="Import">{<Loading />}</Page>;
  if (q.isError) return <Page title="Import">{<ErrorNote error={q.error} />}</Page>;
  const d = q.data;
  // An undo's job runs on a committed import: there is no mapping left to edit.
  const editable = can('technician') && (d.status === 'uploaded' || d.status === 'previewed' || d.status === 'failed' || (isBusy(d) && d.status !== 'undoing'));
  const busyLabel = d.status === 'committing' ? 'Importing' : d.status === 'undoing' ? 'Undoing' : 'Checking every row';
  return (
    <Page
      title={`Import: ${d.originalName}`}
      actions={
        <Link to={paths.imports.href()} className="btn-quiet no-underline">
          All imports
        </Link>
      }
    >
      <Facts d={d} />
      {d.sameFile.length > 0 && d.status !== 'committed' && d.status !== 'undoing' && (
        <p role="note" className="mb-4 rounded border border-margin/40 bg-margin/10 px-3 py-2 text-sm">
          This very file (same SHA-256) was imported before:{' '}
          {d.sameFile.map((s, i) => (
            <span key={s.id}>
              {i > 0 && ', '}
              <Link to={paths.import.href({ id: s.id })}>import {s.id}</Link> ({whenText(s.createdAt)})
            </span>
          ))}
          .
        </p>
      )}
      {isBusy(d) && <ProgressBar label={busyLabel} value={d.progress} />}
      {(d.status === 'failed' || d.status === 'committed') && d.error && <ErrorNote error={new Error(d.error)} />}
      {editable && <MappingForm key={d.mapping ? 'mapped' : 'fresh'} d={d} />}
      {!isBusy(d) && <Preview d={d} />}
      {d.status === 'committed' && can('technician') && <UndoForm d={d} />}
    </Page>
  );
}
