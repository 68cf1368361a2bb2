import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router-dom';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { FrozenEvidence, RenderedMarkdown, SignatureFooter } from '../../../components/ui/signed-record';
import { paths } from '../../../config/paths';
import { wikiExportHref, wikiPageQuery } from '../api/wiki-queries';

/** One approved finding as published: frozen text, numbers and plots, and the signature with its check. */
export function WikiPageScreen() {
  const slug = useParams().slug ?? '';
  const page = useQuery(wikiPageQuery(slug));
  if (page.isPending)
    return (
      <Page title="Wiki">
        <Loading />
      </Page>
    );
  if (page.isError)
    return (
      <Page title="Wiki">
        <ErrorNote error={page.error} />
      </Page>
    );
  const p = page.data;
  return (
    <Page
      title={p.title}
      actions={
        <a className="btn-quiet no-underline" href={wikiExportHref(p.slug)} download>
          Export (Markdown + SVG, .tar.gz)
        </a>
      }
    >
      {p.supersededBy && (
        <p role="note" className="mb-4 rounded border border-amber-ink/50 bg-amber-light/40 px-3 py-2">
          A newer version replaces this page:{' '}
          <Link to={paths.wikiPage.href({ slug: p.supersededBy.slug })}>
            {p.supersededBy.title} (version {p.supersededBy.version})
          </Link>
          . This page stays as it was approved.
        </p>
      )}
      <p className="mb-4 text-sm text-ink-soft">
        Version {p.version} · written by {p.author.name} · approved <time dateTime={p.approvedAt}>{new Date(p.approvedAt).toLocaleString()}</time>
        {p.supersedes && (
          <>
            {' '}
            · replaces <Link to={paths.wikiPage.href({ slug: p.supersedes.slug })}>version {p.supersedes.version}</Link>
          </>
        )}
        {p.species.length > 0 && <> · Species: {p.species.map((s) => s.name).join(', ')}</>}
        {p.resins.length > 0 && <> · Resins: {p.resins.map((r) => r.name).join(', ')}</>}
      </p>
      <article aria-label="Page text">
        <RenderedMarkdown html={p.bodyHtml} />
      </article>
      {p.trials.length > 0 && (
        <p className="mt-3 text-sm">
          From trials:{' '}
          {p.trials.map((t, i) => (
            <span key={t.id}>
              {i > 0 && ', '}
              <Link to={paths.trial.href({ id: t.id })}>
                {t.code} {t.title}
              </Link>
            </span>
          ))}
        </p>
      )}
      {p.evidence.length > 0 && (
        <section aria-label="Evidence" className="mt-6 space-y-4">
          <h2>Evidence, frozen at approval</h2>
          {p.evidence.map((e) => (
            <FrozenEvidence key={e.id} evidence={e} />
          ))}
        </section>
      )}
      <SignatureFooter signature={p.signature} findingId={p.findingId} />
      <p className="mt-2 text-sm">
        <Link to={paths.finding.href({ id: p.findingId })}>The finding and its review thread</Link>
      </p>
    </Page>
  );
}
