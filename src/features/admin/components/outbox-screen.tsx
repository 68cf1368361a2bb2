import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { outboxQuery } from '../api/admin-queries';
import { formatDateTime } from '../../../lib/format/dates';

/** Mail the app would have sent, as caught by the local fake SMTP server. */
export function OutboxScreen() {
  const [page, setPage] = useState(1);
  const outbox = useQuery(outboxQuery(page));
  return (
    <Page title="Outbox">
      <p className="mb-4 max-w-2xl text-sm text-ink-soft">
        Without mail-server settings, Lumenbook keeps its e-mail here instead of sending it. Invitation and reset links can be copied from these
        messages.
      </p>
      {outbox.isPending ? (
        <Loading />
      ) : outbox.isError ? (
        <ErrorNote error={outbox.error} />
      ) : outbox.data.items.length === 0 ? (
        <p>No mail yet.</p>
      ) : (
        <>
          <ol className="space-y-4">
            {outbox.data.items.map((m) => (
              <li key={m.id} className="sheet p-4">
                <article aria-label={m.subject}>
                  <h2 className="text-base">{m.subject}</h2>
                  <p className="text-xs text-ink-faint">
                    To {m.to} · from {m.from} · <time dateTime={m.createdAt}>{formatDateTime(m.createdAt)}</time>
                  </p>
                  <pre className="mt-2 font-mono text-sm break-all whitespace-pre-wrap">{m.text}</pre>
                </article>
              </li>
            ))}
          </ol>
          <nav aria-label="Outbox pages" className="mt-4 flex gap-2">
            <button type="button" className="btn-quiet" disabled={page <= 1} onClick={() => setPage((p) => p - 1)}>
              Newer
            </button>
            <button type="button" className="btn-quiet" disabled={page * outbox.data.pageSize >= outbox.data.total} onClick={() => setPage((p) => p + 1)}>
              Older
            </button>
          </nav>
        </>
      )}
    </Page>
  );
}
