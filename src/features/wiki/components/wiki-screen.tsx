import { useQuery } from '@tanstack/react-query';
import { useId, useState } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import type { WikiList } from '../../../../shared/schemas/wiki';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { wikiIndexQuery, wikiListQuery } from '../api/wiki-queries';

/** Approved findings as the shop's wiki: search, and an index by species and by resin. */
export function WikiScreen() {
  const [params, setParams] = useSearchParams();
  const q = params.get('q') ?? '';
  const [typed, setTyped] = useState(q);
  const list = useQuery(wikiListQuery({ q: q || undefined }));
  const index = useQuery(wikiIndexQuery());
  const id = useId();
  return (
    <Page title="Wiki">
      <form
        role="search"
        className="mb-6 flex flex-wrap items-end gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          setParams(typed.trim() ? { q: typed.trim() } : {});
        }}
      >
        <div className="min-w-72">
          <label htmlFor={`${id}-q`} className="field-label">
            Search the wiki
          </label>
          <input id={`${id}-q`} type="search" className="field-input" value={typed} onChange={(e) => setTyped(e.target.value)} />
        </div>
        <button type="submit" className="btn-primary">
          Search
        </button>
        {q && (
          <button
            type="button"
            className="btn-quiet"
            onClick={() => {
              setTyped('');
              setParams({});
            }}
          >
            Clear
          </button>
        )}
      </form>
      <div className="grid gap-8 lg:grid-cols-[2fr_1fr]">
        <section aria-label={q ? `Pages matching ${q}` : 'Latest pages'}>
          <h2 className="mb-2">{q ? `Pages matching “${q}”` : 'Latest pages'}</h2>
          {list.isPending ? <Loading /> : list.isError ? <ErrorNote error={list.error} /> : <Results list={list.data} searching={q !== ''} />}
        </section>
        <nav aria-label="Wiki index">
          <h2 className="mb-2">By species</h2>
          {index.data?.bySpecies.length === 0 && <p className="text-sm text-ink-soft">No pages yet.</p>}
          <ul className="space-y-2 text-sm">
            {index.data?.bySpecies.map((g) => (
              <li key={g.species.id}>
                <strong>{g.species.name}</strong>
                <ul className="ml-4 list-disc">
                  {g.pages.map((p) => (
                    <li key={p.slug}>
                      <Link to={paths.wikiPage.href({ slug: p.slug })}>{p.title}</Link>
                    </li>
                  ))}
                </ul>
              </li>
            ))}
          </ul>
          <h2 className="mt-6 mb-2">By resin</h2>
          <ul className="space-y-2 text-sm">
            {index.data?.byResin.map((g) => (
              <li key={g.resin.id}>
                <strong>{g.resin.name}</strong>
                <ul className="ml-4 list-disc">
                  {g.pages.map((p) => (
                    <li key={p.slug}>
                      <Link to={paths.wikiPage.href({ slug: p.slug })}>{p.title}</Link>
                    </li>
                  ))}
                </ul>
              </li>
            ))}
          </ul>
        </nav>
      </div>
    </Page>
  );
}

function Results({ list, searching }: { list: WikiList; searching: boolean }) {
  if (list.items.length === 0) return <p>{searching ? 'No page matches these words.' : 'No approved findings yet.'}</p>;
  return (
    <ol className="space-y-3">
      {list.items.map((p) => (
        <li key={p.slug} className="sheet p-3">
          <Link to={paths.wikiPage.href({ slug: p.slug })} className="font-semibold">
            {p.title}
          </Link>
          <p className="text-xs text-ink-faint">
            Version {p.version} · approved by {p.signerName} on <time dateTime={p.approvedAt}>{new Date(p.approvedAt).toLocaleDateString()}</time>
            {[...p.species, ...p.resins].length > 0 && <> · {[...p.species, ...p.resins].map((t) => t.name).join(', ')}</>}
          </p>
          {p.snippet && (
            <p className="mt-1 text-sm">{p.snippet.map((piece, i) => (piece.match ? <mark key={i}>{piece.text}</mark> : <span key={i}>{piece.text}</span>))}</p>
          )}
        </li>
      ))}
    </ol>
  );
}
