import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useRef, useState, type FormEvent } from 'react';
import { Link, useNavigate } from 'react-router-dom';
import { IMPORT_EXTENSIONS, MAX_IMPORT_BYTES, type ImportStatus } from '../../../../shared/constants/imports';
import type { ImportSummary } from '../../../../shared/schemas/imports';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { useRole } from '../../../lib/session';
import { useInvalidate } from '../../../lib/queries/invalidate';
import { importKeys, importListQuery } from '../api/imports-queries';
import { uploadImport } from '../api/upload-import';
import { ProgressBar } from './progress-bar';

export const STATUS_LABELS: Record<ImportStatus, string> = {
  uploaded: 'Uploaded, not yet mapped',
  previewing: 'Checking the rows…',
  previewed: 'Previewed',
  committing: 'Importing…',
  committed: 'Imported',
  undoing: 'Undoing…',
  undone: 'Undone',
  failed: 'Stopped with an error',
};

export function bytesText(n: number): string {
  if (n < 1024) return `${n} bytes`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} KB`;
  return `${(n / 1024 / 1024).toFixed(1)} MB`;
}

export const whenText = (iso: string) => new Date(iso).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });

function UploadForm() {
  const navigate = useNavigate();
  const qc = useQueryClient();
  const invalidate = useInvalidate();
  const input = useRef<HTMLInputElement>(null);
  const [progress, setProgress] = useState<number | null>(null);
  const [error, setError] = useState<unknown>(null);

  async function submit(e: FormEvent) {
    e.preventDefault();
    setError(null);
    const file = input.current?.files?.[0];
    if (!file) return setError(new Error('Choose the file your scale wrote (.csv, .txt or .tsv)'));
    if (file.size > MAX_IMPORT_BYTES)
      return setError(new Error(`${file.name} is larger than the ${MAX_IMPORT_BYTES / 1024 / 1024} MB limit for an import; split it into smaller files`));
    setProgress(0);
    try {
      const d = await uploadImport(file, setProgress);
      qc.setQueryData(importKeys.detail(d.id), d);
      void invalidate('imports');
      void navigate(paths.import.href({ id: d.id }));
    } catch (err) {
      setError(err);
    } finally {
      setProgress(null);
    }
  }

  return (
    <form onSubmit={submit} className="sheet mb-8 max-w-2xl p-5" aria-labelledby="upload-heading">
      <h2 id="upload-heading" className="mb-2">
        Upload a file of readings
      </h2>
      <p className="mb-4 text-sm text-ink-soft">
        The file your balance or scale software writes ({IMPORT_EXTENSIONS.join(', ')}, up to {MAX_IMPORT_BYTES / 1024 / 1024} MB). Lumenbook works out how it
        is written; you check the columns, see every row it cannot use and why, and only then import. Scale writes nothing usable?{' '}
        <a href="/api/imports/template.csv" download>
          Download the template CSV
        </a>
        .
      </p>
      <label htmlFor="import-file" className="field-label">
        File
      </label>
      <input id="import-file" ref={input} type="file" name="file" accept={IMPORT_EXTENSIONS.join(',')} className="field-input" />
      {progress !== null && <ProgressBar label="Uploading" value={progress} />}
      {error !== null && (
        <div className="mt-3">
          <ErrorNote error={error} />
        </div>
      )}
      <button type="submit" className="btn-primary mt-4" disabled={progress !== null}>
        Upload and detect
      </button>
    </form>
  );
}

function Counts({ s }: { s: ImportSummary }) {
  if (!s.counts) return <span className="text-ink-faint">—</span>;
  const c = s.counts;
  return (
    <span>
      {c.accepted} accepted{c.corrections ? `, ${c.corrections} corrections` : ''}, {c.skipped} skipped, {c.problems} with problems
    </span>
  );
}

export function ImportsScreen() {
  const { can } = useRole();
  const [page, setPage] = useState(1);
  const list = useQuery(importListQuery(page));
  return (
    <Page title="Imports">
      {can('technician') && <UploadForm />}
      <section aria-labelledby="history-heading">
        <h2 id="history-heading" className="mb-3">
          History
        </h2>
        {list.isPending ? (
          <Loading />
        ) : list.isError ? (
          <ErrorNote error={list.error} />
        ) : list.data.items.length === 0 ? (
          <p className="text-ink-soft">No file has been uploaded yet.</p>
        ) : (
          <>
            <table className="data-table">
              <caption className="sr-only">Uploaded files, newest first</caption>
              <thead>
                <tr>
                  <th scope="col">File</th>
                  <th scope="col">Uploaded</th>
                  <th scope="col">By</th>
                  <th scope="col">Stage</th>
                  <th scope="col">Rows</th>
                  <th scope="col">State</th>
                </tr>
              </thead>
              <tbody>
                {list.data.items.map((s) => (
                  <tr key={s.id}>
                    <td>
                      <Link to={paths.import.href({ id: s.id })}>{s.originalName}</Link>
                    </td>
                    <td>{whenText(s.createdAt)}</td>
                    <td>{s.createdByName ?? '—'}</td>
                    <td>{s.stage ?? '—'}</td>
                    <td>
                      <Counts s={s} />
                    </td>
                    <td>{STATUS_LABELS[s.status]}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            {list.data.total > list.data.pageSize && (
              <div className="mt-3 flex gap-2">
                <button type="button" className="btn-quiet" disabled={page === 1} onClick={() => setPage(page - 1)}>
                  Newer
                </button>
                <button type="button" className="btn-quiet" disabled={page * list.data.pageSize >= list.data.total} onClick={() => setPage(page + 1)}>
                  Older
                </button>
              </div>
            )}
          </>
        )}
      </section>
    </Page>
  );
}
