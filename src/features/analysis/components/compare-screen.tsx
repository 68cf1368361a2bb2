import { useQuery } from '@tanstack/react-query';
import { paths } from '../../../config/paths';
import { useCallback, useMemo, useState, type ReactNode } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { COUPON_ROLES, SPECIES_ORIGINS } from '../../../../shared/constants/records';
import {
  analysisFiltersSchema,
  type AnalysisFilters,
  type CompareMetric,
  type Fit,
  type GroupSpec,
  type Overview,
  type PointSet,
  type SgBasis,
} from '../../../../shared/schemas/analysis';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { useRole } from '../../../lib/session';
import { useUnits } from '../../../lib/use-units';
import { fitInLength } from '../../../../shared/analysis/thickness-words';
import { toBox, toSi } from '../../../lib/forms/number-input';
import { parseNumber } from '../../../lib/forms/parse-number';
import { filterChoicesQuery, overviewQuery, useSaveEvidence } from '../api/analysis-queries';
import { hardnessPlot, residualPlot, swellingPlot, wpgVsSgPlot, wpgVsThicknessPlot } from './compare-plots';
import { GroupTable } from './group-table';
import { PlotFigure } from './plot-figure';
import { TwoGroupCompare } from './two-group';

const FILTER_KEYS = [
  'trialId',
  'conditionId',
  'speciesId',
  'speciesOrigin',
  'resinId',
  'lotId',
  'runId',
  'role',
  'sourceBoard',
  'thicknessMinMm',
  'thicknessMaxMm',
  'from',
  'to',
] as const;

/** The filters from the address, so a link from a trial, run, species or resin page opens its results. */
export function filtersFromSearch(params: URLSearchParams): AnalysisFilters {
  const raw: Record<string, string> = {};
  for (const k of FILTER_KEYS) {
    const v = params.get(k);
    if (v) raw[k] = v;
  }
  const parsed = analysisFiltersSchema.safeParse(raw);
  if (parsed.success) return parsed.data;
  // Drop only the fields that do not parse, keep the rest.
  const bad = new Set(parsed.error.issues.map((i) => String(i.path[0])));
  const kept = Object.fromEntries(Object.entries(raw).filter(([k]) => !bad.has(k)));
  const again = analysisFiltersSchema.safeParse(kept);
  return again.success ? again.data : {};
}

export function CompareScreen() {
  const [params, setParams] = useSearchParams();
  const filters = useMemo(() => filtersFromSearch(params), [params]);
  const sgBasis: SgBasis = params.get('sgBasis') === 'handbook' ? 'handbook' : 'measured';
  const overview = useQuery(overviewQuery(filters, sgBasis));

  const set = (key: string, value: string | undefined) => {
    const next = new URLSearchParams(params);
    if (value === undefined || value === '') next.delete(key);
    else next.set(key, value);
    setParams(next, { replace: true });
  };

  return (
    <Page title="Compare">
      <FilterBar filters={filters} sgBasis={sgBasis} set={set} />
      {overview.isPending && <Loading label="Working out the numbers…" />}
      {overview.isError && <ErrorNote error={overview.error} />}
      {overview.data && <Results o={overview.data} filters={filters} sgBasis={sgBasis} />}
    </Page>
  );
}

function Select({ label, value, onChange, children }: { label: string; value: string; onChange: (v: string) => void; children: ReactNode }) {
  return (
    <label className="flex flex-col text-sm">
      {label}
      <select value={value} onChange={(e) => onChange(e.target.value)}>
        <option value="">all</option>
        {children}
      </select>
    </label>
  );
}

function FilterBar({ filters, sgBasis, set }: { filters: AnalysisFilters; sgBasis: SgBasis; set: (k: string, v: string | undefined) => void }) {
  const choices = useQuery(filterChoicesQuery());
  const first = (v: number[] | undefined) => (v?.length === 1 ? String(v[0]) : '');
  const c = choices.data;
  // The address keeps thickness in mm (a shared link means the same coupons to every reader); the boxes
  // show and take it in the reader's length unit.
  const units = useUnits();
  const lengthBox = (mm: number | undefined) => (mm === undefined ? '' : String(toBox(mm, 'length', units)));
  const setLength = (key: string, text: string) => {
    const n = parseNumber(text);
    const mm = n === null || Number.isNaN(n) ? null : toSi(n, 'length', units);
    set(key, mm === null ? undefined : String(Number(mm.toPrecision(10))));
  };
  return (
    <section aria-label="Filters" className="sheet mb-6 p-4">
      <div className="flex flex-wrap items-end gap-3">
        <Select label="Trial" value={first(filters.trialId)} onChange={(v) => set('trialId', v)}>
          {c?.trials.map((t) => (
            <option key={t.id} value={t.id}>
              {t.name}
            </option>
          ))}
        </Select>
        <Select label="Species" value={first(filters.speciesId)} onChange={(v) => set('speciesId', v)}>
          {c?.species.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name}
            </option>
          ))}
        </Select>
        <Select label="Species source" value={filters.speciesOrigin ?? ''} onChange={(v) => set('speciesOrigin', v)}>
          {SPECIES_ORIGINS.map((o) => (
            <option key={o} value={o}>
              {o === 'handbook' ? 'handbook' : 'shop-measured'}
            </option>
          ))}
        </Select>
        <Select label="Resin" value={first(filters.resinId)} onChange={(v) => set('resinId', v)}>
          {c?.resins.map((r) => (
            <option key={r.id} value={r.id}>
              {r.name}
            </option>
          ))}
        </Select>
        <Select label="Run" value={first(filters.runId)} onChange={(v) => set('runId', v)}>
          {c?.runs.map((r) => (
            <option key={r.id} value={r.id}>
              {r.name}
            </option>
          ))}
        </Select>
        <Select label="Role" value={filters.role ?? ''} onChange={(v) => set('role', v)}>
          {COUPON_ROLES.map((r) => (
            <option key={r} value={r}>
              {r}
            </option>
          ))}
        </Select>
        <TextFilter label="Source board" value={filters.sourceBoard ?? ''} onCommit={(v) => set('sourceBoard', v)} />
        <TextFilter
          label={`Thickness from (${units.label('length')})`}
          type="number"
          value={lengthBox(filters.thicknessMinMm)}
          onCommit={(v) => setLength('thicknessMinMm', v)}
        />
        <TextFilter
          label={`to (${units.label('length')})`}
          type="number"
          value={lengthBox(filters.thicknessMaxMm)}
          onCommit={(v) => setLength('thicknessMaxMm', v)}
        />
        <TextFilter label="Treated from" type="date" value={filters.from ?? ''} onCommit={(v) => set('from', v)} />
        <TextFilter label="to" type="date" value={filters.to ?? ''} onCommit={(v) => set('to', v)} />
      </div>
      <p className="mt-2 text-xs text-ink-soft">
        Treated dates are when the run's cure began (its soak, when no cure is recorded). Controls stay in when their trial has a coupon treated in the range;
        coupons not yet in a run have no treated date and drop out.
      </p>
      <fieldset className="mt-3 flex flex-wrap items-center gap-4 text-sm">
        <legend className="sr-only">Oven-dry SG on the x axis</legend>
        <span className="font-semibold">SG on the x axis:</span>
        <label className="flex items-center gap-1">
          <input type="radio" name="sgBasis" checked={sgBasis === 'measured'} onChange={() => set('sgBasis', undefined)} />
          each coupon's measured SG
        </label>
        <label className="flex items-center gap-1">
          <input type="radio" name="sgBasis" checked={sgBasis === 'handbook'} onChange={() => set('sgBasis', 'handbook')} />
          the species' handbook SG
        </label>
      </fieldset>
    </section>
  );
}

function TextFilter({ label, value, onCommit, type = 'text' }: { label: string; value: string; onCommit: (v: string) => void; type?: string }) {
  const [draft, setDraft] = useState(value);
  const [seen, setSeen] = useState(value);
  if (seen !== value) {
    setSeen(value);
    setDraft(value);
  }
  return (
    <label className="flex flex-col text-sm">
      {label}
      <input
        type={type}
        className={type === 'number' ? 'w-24' : type === 'date' ? '' : 'w-32'}
        value={draft}
        onChange={(e) => setDraft(e.target.value)}
        onBlur={() => draft !== value && onCommit(draft.trim())}
        onKeyDown={(e) => {
          if (e.key === 'Enter') onCommit(draft.trim());
        }}
      />
    </label>
  );
}

const shownText = (p: PointSet) =>
  p.method === 'all'
    ? `${p.total} coupon${p.total === 1 ? '' : 's'} shown.`
    : `${p.shown} of ${p.total} coupons shown (thinned evenly within each species × resin; outliers always shown); the fit uses all ${p.total}.`;

/** A density given in g/cm³, in the reader's density unit. */
type DensityText = (gcm3: number) => string;

function fillText(o: Overview, density: DensityText): string {
  return o.theoreticalMax
    .map((t) =>
      t.impliedFill
        ? `With ${t.resinName} (cured ${density(t.resinDensityGcm3)}) the coupons filled about ${(t.impliedFill.fraction * 100).toFixed(0)} % of the voids (95 % CI ${(t.impliedFill.ci95[0] * 100).toFixed(0)} to ${(t.impliedFill.ci95[1] * 100).toFixed(0)} %, ${t.impliedFill.n} coupons).`
        : '',
    )
    .filter(Boolean)
    .join(' ');
}

function Results({ o, filters, sgBasis }: { o: Overview; filters: AnalysisFilters; sgBasis: SgBasis }) {
  const navigate = useNavigate();
  const [compareView, setCompareView] = useState<{ a: GroupSpec; b: GroupSpec; metric: CompareMetric } | null>(null);
  const openCoupon = useCallback(
    (d: unknown) => {
      const id = (d as { id?: unknown }).id;
      if (typeof id === 'number') navigate(paths.coupon.href({ id }));
    },
    [navigate],
  );
  const xLabel = sgBasis === 'measured' ? "Oven-dry SG (each coupon's own)" : "Oven-dry SG (species' handbook value)";
  const buildSg = useCallback(() => wpgVsSgPlot({ densityFit: o.densityFit, theoreticalMax: o.theoreticalMax, points: o.plots.wpgVsSg }, xLabel), [o, xLabel]);
  const units = useUnits();
  const axis = useMemo(() => ({ label: units.label('length'), perMm: units.toDisplay(1, 'length'), digits: units.decimals('length') }), [units]);
  // Thickness fits come per mm from the server; a reader in inches reads them per 0.1 in.
  const lengthWords = useMemo(() => ({ label: units.label('length'), mmPer: units.fromDisplay(1, 'length') }), [units]);
  const thicknessFit = useMemo(() => o.thicknessFit && fitInLength(o.thicknessFit, lengthWords), [o.thicknessFit, lengthWords]);
  const multipleFit = useMemo(() => o.multipleFit && fitInLength(o.multipleFit, lengthWords), [o.multipleFit, lengthWords]);
  // Stored densities are kg/m³; 1 g/cm³ = 1000 kg/m³.
  const density: DensityText = (gcm3) => units.format(gcm3 * 1000, 'density');
  const buildThickness = useCallback(() => wpgVsThicknessPlot(o.thicknessFit, o.plots.wpgVsThickness, axis), [o, axis]);
  const buildResiduals = useCallback(() => residualPlot(o.plots.residuals), [o]);
  const buildHardness = useCallback(() => hardnessPlot(o.plots.hardness), [o]);
  const buildSwelling = useCallback(() => swellingPlot(o.plots.swelling), [o]);

  return (
    <>
      <p className="mb-4 text-sm" role="status">
        {o.counts.matched} coupons match: {o.counts.treatedIncluded} treated coupons in the uptake analysis, {o.counts.controls} controls, {o.counts.excluded}{' '}
        excluded (listed below with the reason).
      </p>

      <h2 className="mb-3">Uptake</h2>
      {o.plots.wpgVsSg.total > 0 ? (
        <PlotFigure
          title={`WPG against ${sgBasis === 'measured' ? 'measured' : 'handbook'} oven-dry SG`}
          caption={`${o.densityFit?.sentence ?? o.fitNotes.join(' ')} The dashed curve is the theoretical maximum if every void filled with resin (porosity model, cell wall ${density(1.5)}). ${fillText(o, density)} ${shownText(o.plots.wpgVsSg)}`}
          fileName="wpg-vs-sg"
          build={buildSg}
          onPick={openCoupon}
          testId="plot-wpg-sg"
        />
      ) : (
        <p className="mb-6 text-ink-soft">No treated coupon here has both WPG and SG yet.</p>
      )}
      {o.plots.wpgVsThickness.total > 0 && (
        <PlotFigure
          title="WPG against thickness"
          caption={`${thicknessFit?.sentence ?? 'No line: the coupons do not spread in thickness.'} ${shownText(o.plots.wpgVsThickness)}`}
          fileName="wpg-vs-thickness"
          build={buildThickness}
          onPick={openCoupon}
          testId="plot-wpg-thickness"
        />
      )}

      <BelowFold size={360}>
        <MultipleReadout fit={multipleFit} notes={o.fitNotes} />
      </BelowFold>
      <BelowFold size={Math.min(2400, 160 + 36 * o.groups.length)}>
        <GroupTable groups={o.groups} />
      </BelowFold>
      <BelowFold size={500}>
        <TwoGroupCompare key={JSON.stringify(filters)} groups={o.groups} filters={filters} onResult={setCompareView} />
      </BelowFold>

      {o.plots.hardness.length > 0 && (
        <PlotFigure
          title="Hardness, treated and control"
          caption={`Each dot is one coupon's hardness (${o.plots.hardness.length} coupons); blue circles are treated, orange squares untreated controls of the same species. Scales are never converted. Hardness gain per species and resin is in the table above.`}
          fileName="hardness"
          build={buildHardness}
          onPick={openCoupon}
        />
      )}
      {o.plots.swelling.length > 0 && (
        <PlotFigure
          title="Swelling in the water soak, ASE and WRE"
          caption={`Each dot is one coupon's swelling after the water soak (${o.plots.swelling.length} coupons). Treated coupons that swell less than their controls have a positive anti-swell efficiency (ASE) when swelling is measured on dimensions, or a positive water-repellent effectiveness (WRE) when the soak is judged by mass; both are in the table above, never pooled.`}
          fileName="swelling"
          build={buildSwelling}
          onPick={openCoupon}
        />
      )}
      {o.plots.residuals.total > 0 && (
        <PlotFigure
          title="Residuals against fitted WPG"
          caption={`Distance of each coupon from the WPG–SG line against the line's value. A funnel or a curve here means the straight line misses a pattern; points beyond about ±3 residual SDs are listed as outliers. ${shownText(o.plots.residuals)}`}
          fileName="residuals"
          build={buildResiduals}
          onPick={openCoupon}
        />
      )}

      <BelowFold size={Math.min(2400, 80 + 24 * o.outliers.length)}>
        <Outliers o={o} />
      </BelowFold>
      <BelowFold size={Math.min(4800, 80 + 24 * Math.min(o.excluded.length, 201))}>
        <Excluded o={o} />
      </BelowFold>
      <SaveView filters={filters} sgBasis={sgBasis} compare={compareView} />
    </>
  );
}

/**
 * A part of the page below the first plot: the browser skips its layout and painting until it comes near
 * the window (CSS content-visibility: auto; its text stays in the page for find-in-page and assistive
 * technology), so the first screen is laid out without the long table and lists under it. `size` is the
 * height it is assumed to take until then.
 */
function BelowFold({ size, children }: { size: number; children: ReactNode }) {
  return <div style={{ contentVisibility: 'auto', containIntrinsicSize: `auto ${size}px` }}>{children}</div>;
}

const sign = (v: number, d: number) => (v < 0 ? `−${Math.abs(v).toFixed(d)}` : v.toFixed(d));

function MultipleReadout({ fit, notes }: { fit: Fit | null; notes: string[] }) {
  return (
    <section aria-labelledby="multiple-h" className="sheet mb-8 p-4">
      <h2 id="multiple-h">Uptake on SG and thickness together</h2>
      {fit ? (
        <>
          <p className="my-2 max-w-3xl" data-testid="multiple-sentence">
            {fit.sentence}
          </p>
          <table className="data-table">
            <caption className="sr-only">Multiple regression of WPG on oven-dry SG and thickness</caption>
            <thead>
              <tr>
                <th scope="col">Term</th>
                <th scope="col">Coefficient</th>
                <th scope="col">SE</th>
                <th scope="col">95 % CI</th>
              </tr>
            </thead>
            <tbody>
              {fit.coefficients.map((c) => (
                <tr key={c.name}>
                  <th scope="row" className="text-left font-normal">
                    {c.name}
                  </th>
                  <td>{sign(c.estimate, 3)}</td>
                  <td>{c.se.toFixed(3)}</td>
                  <td>
                    {sign(c.ci95[0], 3)} to {sign(c.ci95[1], 3)}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="mt-1 text-sm text-ink-soft">
            R² = {fit.r2.toFixed(3)}, residual SD {fit.residualSd.toFixed(2)} points of WPG, n = {fit.n}.
          </p>
        </>
      ) : (
        <p className="text-ink-soft">{notes.find((n) => n.includes('together')) ?? 'Not enough coupons for this fit.'}</p>
      )}
    </section>
  );
}

function Outliers({ o }: { o: Overview }) {
  return (
    <section aria-labelledby="outliers-h" className="mb-8">
      <h2 id="outliers-h">Outliers</h2>
      {o.outliers.length === 0 ? (
        <p className="text-ink-soft">
          No coupon lies more than 3 residual SDs from the line, and no measured SG is more than 3 species SDs from its reference.
        </p>
      ) : (
        <ul className="list-disc pl-5">
          {o.outliers.map((x) => (
            <li key={`${x.kind}-${x.id}`}>
              <Link to={paths.coupon.href({ id: x.id })}>{x.tag}</Link>: {x.reason}
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

function Excluded({ o }: { o: Overview }) {
  return (
    <section aria-labelledby="excluded-h" className="mb-8">
      <h2 id="excluded-h">Excluded coupons ({o.excluded.length})</h2>
      {o.excluded.length === 0 ? (
        <p className="text-ink-soft">Every treated coupon that matches has what the uptake analysis needs.</p>
      ) : (
        <ul className="list-disc pl-5" data-testid="excluded-list">
          {o.excluded.slice(0, 200).map((x) => (
            <li key={x.id}>
              <Link to={paths.coupon.href({ id: x.id })}>{x.tag}</Link>: {x.reasons.join('; ')}
            </li>
          ))}
          {o.excluded.length > 200 && <li>… and {o.excluded.length - 200} more</li>}
        </ul>
      )}
    </section>
  );
}

function SaveView({
  filters,
  sgBasis,
  compare,
}: {
  filters: AnalysisFilters;
  sgBasis: SgBasis;
  compare: { a: GroupSpec; b: GroupSpec; metric: CompareMetric } | null;
}) {
  const { can } = useRole();
  const save = useSaveEvidence();
  const [title, setTitle] = useState('');
  if (!can('technician')) return null;
  return (
    <section aria-labelledby="save-h" className="sheet mb-8 p-4">
      <h2 id="save-h">Save this view as evidence</h2>
      <p className="mb-2 text-sm text-ink-soft">
        Saves the filters with a frozen copy of the numbers and the plot{compare ? ', including the two-group comparison' : ''}. The saved numbers never change;
        if readings are corrected later, the saved view says that a newer answer exists. Findings attach saved views by their number.
      </p>
      <form
        className="flex flex-wrap items-end gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          save.mutate({ title, view: { filters, sgBasis, ...(compare ? { compare } : {}) } });
        }}
      >
        <label className="flex flex-col text-sm">
          Title
          <input className="w-96" value={title} onChange={(e) => setTitle(e.target.value)} maxLength={160} />
        </label>
        <button type="submit" className="btn-primary" disabled={save.isPending}>
          Save view
        </button>
      </form>
      {save.isError && <ErrorNote error={save.error} />}
      <div role="status" className="mt-2 text-sm">
        {save.data && (
          <>
            Saved as view no. {save.data.evidence.id}. <Link to={paths.compareView.href({ id: save.data.evidence.id })}>Open the saved view</Link>
          </>
        )}
      </div>
    </section>
  );
}
