import { useQuery } from '@tanstack/react-query';
import type { Evidence, Signature } from '../../../shared/schemas/findings';
import { verificationQuery } from '../../lib/queries/signatures';

/**
 * HTML the server rendered from Markdown and sanitised (markdown-it without raw HTML, then an allowlist);
 * it is the only HTML the client inserts as is.
 */
export function RenderedMarkdown({ html, label }: { html: string; label?: string }) {
  return <div className="rendered-md" aria-label={label} dangerouslySetInnerHTML={{ __html: html }} />;
}

interface GroupRow {
  speciesName?: unknown;
  resinName?: unknown;
  nCoupons?: unknown;
  wpg?: { mean?: unknown; sd?: unknown; n?: unknown } | null;
}

const num = (v: unknown, digits = 1) => (typeof v === 'number' && Number.isFinite(v) ? v.toFixed(digits) : '—');

/** One piece of frozen evidence: the plot drawn by the server at attach time, and the numbers it stands on. */
export function FrozenEvidence({ evidence, actions }: { evidence: Evidence; actions?: React.ReactNode }) {
  const snap = evidence.snapshot as { computedAt?: unknown; plot?: { spec?: { caption?: unknown } }; numbers?: { overview?: { groups?: unknown } } };
  const groups = Array.isArray(snap.numbers?.overview?.groups) ? (snap.numbers.overview.groups as GroupRow[]) : [];
  const caption = typeof snap.plot?.spec?.caption === 'string' ? snap.plot.spec.caption : null;
  return (
    <figure className="sheet p-4" aria-label={`Evidence: ${evidence.title}`}>
      <div className="flex flex-wrap items-start justify-between gap-2">
        <figcaption>
          <strong>{evidence.title}</strong>
          <span className="block text-xs text-ink-faint">
            Frozen when {evidence.attachedBy.name} attached it, <time dateTime={evidence.attachedAt}>{new Date(evidence.attachedAt).toLocaleString()}</time>
            {typeof snap.computedAt === 'string' && <> · computed {new Date(snap.computedAt).toLocaleString()}</>}
          </span>
        </figcaption>
        {actions}
      </div>
      {evidence.svg ? (
        <img
          className="mt-3 w-full max-w-2xl border border-paper-edge bg-white"
          src={`data:image/svg+xml;charset=utf-8,${encodeURIComponent(evidence.svg)}`}
          alt={`Plot of ${evidence.title}${caption ? `: ${caption}` : ''}`}
        />
      ) : (
        <p className="mt-2 text-sm text-ink-faint">This view has no plot.</p>
      )}
      {caption && <p className="mt-1 text-sm text-ink-soft">{caption}</p>}
      {groups.length > 0 && (
        <table className="data-table mt-3">
          <caption className="text-left text-sm text-ink-soft">Weight percent gain by species and resin, as frozen</caption>
          <thead>
            <tr>
              <th scope="col">Species</th>
              <th scope="col">Resin</th>
              <th scope="col">Coupons</th>
              <th scope="col">Mean WPG %</th>
              <th scope="col">SD</th>
            </tr>
          </thead>
          <tbody>
            {groups.map((g, i) => (
              <tr key={i}>
                <td>{String(g.speciesName ?? '—')}</td>
                <td>{String(g.resinName ?? '—')}</td>
                <td>{String(g.nCoupons ?? '—')}</td>
                <td>{num(g.wpg?.mean)}</td>
                <td>{num(g.wpg?.sd)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      <details className="mt-2 text-sm">
        <summary>All frozen numbers</summary>
        <pre className="mt-2 max-h-72 overflow-auto font-mono text-xs whitespace-pre-wrap">{JSON.stringify(evidence.snapshot, null, 2)}</pre>
      </details>
    </figure>
  );
}

/** The signature of an approved finding, printed as signed, with an on-demand check that nothing changed since. */
export function SignatureFooter({ signature, findingId }: { signature: Signature; findingId: number }) {
  const check = useQuery(verificationQuery(findingId));
  const v = check.data;
  return (
    <section className="sheet mt-6 p-4" aria-label="Electronic signature">
      <h2 className="text-base">Electronic signature</h2>
      <p className="mt-1">
        Signed by <strong>{signature.signerName}</strong> — {signature.meaningLabel} —{' '}
        <time dateTime={signature.signedAt}>{new Date(signature.signedAt).toLocaleString()}</time>
      </p>
      <p className="mt-1 font-mono text-xs break-all text-ink-soft">
        {signature.algorithm} {signature.contentHash}
      </p>
      <div className="mt-3 flex flex-wrap items-center gap-3">
        <button type="button" className="btn-quiet" onClick={() => void check.refetch()} disabled={check.isFetching}>
          {check.isFetching ? 'Checking…' : 'Verify signature'}
        </button>
        <div role="status" aria-live="polite">
          {check.isError && <span className="text-margin">The check could not run: {check.error.message}</span>}
          {v && v.status === 'intact' && (
            <span className="font-semibold text-moss">
              Intact: the content recomputes to the signed hash (checked {new Date(v.checkedAt).toLocaleTimeString()}).
            </span>
          )}
          {v && v.status === 'altered' && <span className="font-semibold text-margin">Altered: the content no longer matches what was signed.</span>}
        </div>
      </div>
      {v && v.status === 'altered' && (
        <ul className="mt-2 list-disc pl-6 text-sm text-margin">
          {v.differences.map((d) => (
            <li key={d}>{d}</li>
          ))}
        </ul>
      )}
    </section>
  );
}
