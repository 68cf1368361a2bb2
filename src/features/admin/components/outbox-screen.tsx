import { useQuery } from '@tanstack/react-query';
import { useState, type ReactNode } from 'react';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { outboxQuery } from '../api/admin-queries';
import { formatDateTime } from '../../../lib/format/dates';

// Web addresses in a message; a sentence's closing punctuation is not part of the address.
const URL_PATTERN = /https?:\/\/[^\s<>"']+[^\s<>"'.,;:!?)\]]/g;

/** Plain mail text with its web addresses as links, so an invitation or reset link opens with one click. */
export function Linked({ text }: { text: string }) {
  const parts: ReactNode[] = [];
  let last = 0;
  for (const m of text.matchAll(URL_PATTERN)) {
    const at = m.index ?? 0;
    if (at > last) parts.push(text.slice(last, at));
    parts.push(
      <a key={at} href={m[0]}>
        {m[0]}
      </a>,
    );
    last = at + m[0].length;
  }
  if (last < text.length) parts.push(text.slice(last));
  return <>{parts}</>;
}

/** Mail the app would have sent, as caught by the local fake SMTP server. */
export function OutboxScreen() {
  const [page, setPage] = useState(1);
  const outbox = useQuery(outboxQuery(page));
  return (
    <Page title="Outbox">
      <p className="mb-4 max-w-2xl text-sm text-ink-soft">
        Without mail-server settings, Lumenbook keeps its e-mail here instead of sending it. Invitation and reset links in these messages open with a click.
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
                  <pre className="mt-2 font-mono text-sm break-all whitespace-pre-wrap">
                    <Linked text={m.text} />
                  </pre>
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
