import { useQuery } from '@tanstack/react-query';
import { paths } from '../../../config/paths';
import { useCallback } from 'react';
import { Link, useParams } from 'react-router-dom';
import type { EvidenceResponse } from '../../../../shared/schemas/analysis';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { evidenceQuery, filterParams } from '../api/analysis-queries';
import { wpgVsSgPlot } from './compare-plots';
import { GroupTable } from './group-table';
import { PlotFigure } from './plot-figure';
import { CompareReadout } from './two-group';

/** A saved view: its frozen numbers and plot, and a notice when the same view now gives other numbers. */
export function EvidenceScreen() {
  const id = Number(useParams().id);
  const q = useQuery({ ...evidenceQuery(id), enabled: Number.isInteger(id) && id > 0 });
  if (q.isPending)
    return (
      <Page title="Saved view">
        <Loading />
      </Page>
    );
  if (q.isError)
    return (
      <Page title="Saved view">
        <ErrorNote error={q.error} />
      </Page>
    );
  return <EvidenceView data={q.data} />;
}

function EvidenceView({ data }: { data: EvidenceResponse }) {
  const { evidence: e, newerAnswer } = data;
  const o = e.snapshot.numbers.overview;
  const build = useCallback(
    () => wpgVsSgPlot({ densityFit: o.densityFit, theoreticalMax: o.theoreticalMax, points: e.snapshot.plot.data }, e.snapshot.plot.spec.x.label),
    [o, e.snapshot.plot],
  );
  const params = new URLSearchParams(Object.entries({ ...filterParams(e.view.filters), sgBasis: e.view.sgBasis }).map(([k, v]) => [k, String(v)]));
  return (
    <Page title={`Saved view ${e.id}: ${e.title}`}>
      <p className="mb-2 text-sm text-ink-soft">
        Saved {new Date(e.createdAt).toLocaleString()}
        {e.createdBy ? ` by ${e.createdBy.name}` : ''}. Fingerprint {e.fingerprint.slice(0, 12)}.
      </p>
      {newerAnswer.exists ? (
        <p role="status" className="mb-4 rounded border border-amber/60 bg-amber/10 px-3 py-2">
          <strong>A newer answer exists.</strong> Readings have changed since this view was saved; the numbers below are as saved.{' '}
          <Link to={paths.compare.href(Object.fromEntries(params))}>Open the same view with today's numbers</Link>.
        </p>
      ) : (
        <p role="status" className="mb-4 text-sm">
          The same view computed now gives the same numbers.
        </p>
      )}
      {e.note && <p className="mb-4">{e.note}</p>}
      <PlotFigure title={`WPG against oven-dry SG (as saved)`} caption={e.snapshot.plot.spec.caption} fileName={`saved-view-${e.id}`} build={build} />
      <GroupTable groups={o.groups} />
      {e.snapshot.numbers.compare && (
        <section className="sheet mb-8 p-4" aria-label="Two-group comparison as saved">
          <h2>Two-group comparison</h2>
          <CompareReadout r={e.snapshot.numbers.compare} />
        </section>
      )}
    </Page>
  );
}
