import { useQuery } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import { Link, useLocation, useParams, useSearchParams } from 'react-router-dom';
import { WEIGHING_STAGES, type WeighingStage } from '../../../../shared/constants/records';
import type { CheckOut, CouponDetail, WeighingOut } from '../../../../shared/schemas/coupons';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { useRole } from '../../../lib/session';
import { useUnits } from '../../../lib/use-units';
import { couponQuery } from '../api/coupons-queries';
import {
  CHECK_STAGE_LABELS,
  CorrectCheckForm,
  CorrectWeighingForm,
  DimensionForm,
  HardnessForm,
  MoistureForm,
  SoakTestForm,
  WEIGHING_STAGE_LABELS,
  WeighingForm,
} from './coupon-forms';
import { CouponHistoryPanel } from './coupon-history';
import { CouponPhotos } from './coupon-photos';
import { paths } from '../../../config/paths';
import { formatDateTime } from '../../../lib/format/dates';

const when = formatDateTime;
const pct = (v: number | null, d = 1) => (v === null ? '—' : `${v.toFixed(d)} %`);

function Metrics({ coupon }: { coupon: CouponDetail }) {
  const u = useUnits();
  const m = coupon.metrics;
  const rows: [string, string][] = [
    ['Dry mass', u.format(m.dryMassG, 'mass')],
    ['Soaked mass', u.format(m.soakedMassG, 'mass')],
    ['Cured mass', u.format(m.curedMassG, 'mass')],
    ['Dry volume', u.format(m.dryVolumeCm3, 'volume')],
    ['Cured volume', u.format(m.curedVolumeCm3, 'volume')],
    [
      'Moisture content',
      m.mcPct === null
        ? '—'
        : `${m.mcPct.toFixed(1)} % (${m.mcSource === 'moisture-check' ? 'meter or oven reading' : 'first drying check against the dry mass'})`,
    ],
    ['Dry density', u.format(m.dryDensityKgM3, 'density')],
    ['Dry SG', m.drySg === null ? '—' : m.drySg.toFixed(3)],
    ['Wet uptake after the soak', pct(m.wetUptakePct)],
    ['WPG (cured)', pct(m.wpgPct)],
    ['Resin loading', u.format(m.resinLoadingKgM3, 'density')],
    ['Void fill', pct(m.voidFillPct, 0)],
    ['Most the resin could add', pct(m.maxWpgPct, 0)],
    ['Cure loss', pct(m.cureLossPct)],
    ['Bulking', pct(m.bulkingPct)],
    ['Water-soak swelling', m.swellingPct === null ? '—' : `${m.swellingPct.toFixed(1)} % (by ${m.swellingBasis})`],
    [
      // On the mass basis the number is a water-repellent effectiveness, not an anti-swell efficiency.
      coupon.antiSwell?.name ?? 'Anti-swell efficiency (ASE) or water-repellent effectiveness (WRE)',
      coupon.antiSwell
        ? `${coupon.antiSwell.asePct.toFixed(0)} % against ${coupon.antiSwell.controlCount} control${coupon.antiSwell.controlCount === 1 ? '' : 's'} swelling ${coupon.antiSwell.controlSwellingPct.toFixed(1)} % (by ${coupon.antiSwell.basis})`
        : coupon.role === 'control'
          ? 'not for a control'
          : '— (needs a soak test of this coupon and of a control of the same species)',
    ],
  ];
  return (
    <>
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-0.5 text-sm">
        {rows.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="text-ink-soft">{k}</dt>
            <dd className="tabular-nums">{v}</dd>
          </div>
        ))}
        <dt className="text-ink-soft">Hardness</dt>
        <dd>
          {m.hardness.length === 0 ? '—' : m.hardness.map((h) => `${u.hardness(h.value, h.scale)} (${CHECK_STAGE_LABELS[h.stage].toLowerCase()})`).join('; ')}
        </dd>
      </dl>
      {coupon.warnings.length > 0 && (
        <ul className="mt-3 space-y-1 text-sm">
          {coupon.warnings.map((w, i) => (
            <li key={i} className="rounded border border-amber-ink px-2 py-1 text-amber-ink">
              <strong>Warning:</strong> {w.message}
            </li>
          ))}
        </ul>
      )}
    </>
  );
}

function checkValues(c: CheckOut, u: ReturnType<typeof useUnits>): string {
  if (c.kind === 'dimension') {
    const size =
      c.lengthMm !== null && c.widthMm !== null && c.thicknessMm !== null
        ? `${u.format(c.lengthMm, 'length', false)} × ${u.format(c.widthMm, 'length', false)} × ${u.format(c.thicknessMm, 'length')}`
        : null;
    const vol = c.volumeCm3 !== null ? `${u.format(c.volumeCm3, 'volume')} by immersion` : null;
    return [size, vol].filter(Boolean).join('; ');
  }
  if (c.kind === 'hardness') return c.hardnessScale ? u.hardness(c.hardnessValue, c.hardnessScale) : String(c.hardnessValue);
  return `${c.moisturePct} % MC`;
}

function Readings({ coupon }: { coupon: CouponDetail }) {
  const u = useUnits();
  const { can } = useRole();
  const [editing, setEditing] = useState<string | null>(null);
  const stages: WeighingStage[] = WEIGHING_STAGES.filter((s) => coupon.weighings.some((w) => w.stage === s) || coupon.checks.some((c) => c.stage === s));
  if (stages.length === 0) return <p className="text-ink-soft">No readings yet.</p>;
  const weighingRow = (w: WeighingOut) => (
    <li key={`w${w.id}`} className="py-1">
      <span className="tabular-nums">{u.format(w.massG, 'mass')}</span>{' '}
      <span className="text-ink-soft">
        weighed {when(w.measuredAt)}
        {w.importId !== null ? ' (from an import)' : ''}
      </span>
      {can('technician') && editing !== `w${w.id}` && (
        <button type="button" className="btn-quiet ml-2 min-h-6 px-2 py-0.5 text-xs" onClick={() => setEditing(`w${w.id}`)}>
          Correct<span className="sr-only"> the {w.stage} weighing</span>
        </button>
      )}
      {editing === `w${w.id}` && <CorrectWeighingForm weighing={w} onDone={() => setEditing(null)} />}
    </li>
  );
  const checkRow = (c: CheckOut) => (
    <li key={`c${c.id}`} className="py-1">
      <span className="text-ink-soft">{c.kind}:</span> <span className="tabular-nums">{checkValues(c, u)}</span>{' '}
      <span className="text-ink-soft">
        {when(c.measuredAt)}
        {c.method ? ` · ${c.method}` : ''}
      </span>
      {can('technician') && editing !== `c${c.id}` && (
        <button type="button" className="btn-quiet ml-2 min-h-6 px-2 py-0.5 text-xs" onClick={() => setEditing(`c${c.id}`)}>
          Correct
          <span className="sr-only">
            {' '}
            the {c.stage} {c.kind} check
          </span>
        </button>
      )}
      {editing === `c${c.id}` && <CorrectCheckForm check={c} onDone={() => setEditing(null)} />}
    </li>
  );
  return (
    <div className="space-y-3">
      {stages.map((s) => (
        <div key={s}>
          <h3 className="font-semibold">{WEIGHING_STAGE_LABELS[s]}</h3>
          <ul className="divide-y divide-paper-edge text-sm">
            {coupon.weighings.filter((w) => w.stage === s).map(weighingRow)}
            {coupon.checks.filter((c) => c.stage === s).map(checkRow)}
          </ul>
        </div>
      ))}
    </div>
  );
}

export function CouponScreen() {
  const params = useParams();
  const id = Number(params.id);
  const coupon = useQuery({ ...couponQuery(id), enabled: Number.isInteger(id) && id > 0 });
  const [search] = useSearchParams();
  const location = useLocation();
  const { can } = useRole();
  const units = useUnits();
  const weigh = WEIGHING_STAGES.find((s) => s === search.get('weigh'));

  const loadedId = coupon.data?.id;
  useEffect(() => {
    if (loadedId === undefined || !location.hash) return;
    const el = document.getElementById(location.hash.slice(1));
    el?.scrollIntoView({ block: 'start' });
    el?.focus({ preventScroll: true });
  }, [loadedId, location.hash]);

  if (!Number.isInteger(id) || id <= 0)
    return (
      <Page title="Coupon">
        <ErrorNote error={new Error('There is no coupon at this address.')} />
      </Page>
    );
  if (coupon.isPending)
    return (
      <Page title="Coupon">
        <Loading />
      </Page>
    );
  if (coupon.isError)
    return (
      <Page title="Coupon">
        <ErrorNote error={coupon.error} />
      </Page>
    );
  const c = coupon.data;
  return (
    <Page
      title={`Coupon ${c.tag}`}
      actions={
        c.runId ? (
          <Link to={paths.runCoupons.href({ id: c.runId }, { focus: c.id })} className="btn-quiet no-underline">
            In the run's grid
          </Link>
        ) : c.trialId ? (
          <Link to={paths.trialCoupons.href({ id: c.trialId }, { focus: c.id })} className="btn-quiet no-underline">
            In the trial's grid
          </Link>
        ) : undefined
      }
    >
      <dl className="mb-6 grid gap-x-6 gap-y-1 text-sm sm:grid-cols-[auto_1fr_auto_1fr]">
        <dt className="text-ink-soft">Species</dt>
        <dd>{c.speciesName}</dd>
        <dt className="text-ink-soft">Role</dt>
        <dd>{c.role === 'control' ? 'control (untreated)' : 'treated'}</dd>
        <dt className="text-ink-soft">Trial</dt>
        <dd>{c.trialId ? <Link to={paths.trial.href({ id: c.trialId })}>{c.trialCode ?? c.trialId}</Link> : 'none'}</dd>
        <dt className="text-ink-soft">Condition</dt>
        <dd>{c.condition ? c.condition.label : c.role === 'control' ? 'untreated control' : 'none'}</dd>
        <dt className="text-ink-soft">Run</dt>
        <dd>{c.runId ? <Link to={paths.run.href({ id: c.runId })}>{c.runCode ?? c.runId}</Link> : 'none'}</dd>
        <dt className="text-ink-soft">Resin</dt>
        <dd>{c.resin ? `${c.resin.name} (cured ${units.format(c.resin.curedDensityGcm3 * 1000, 'density')})` : 'none yet'}</dd>
        <dt className="text-ink-soft">Source board</dt>
        <dd>{c.sourceBoard ?? '—'}</dd>
        {c.notes && (
          <>
            <dt className="text-ink-soft">Notes</dt>
            <dd className="sm:col-span-3 whitespace-pre-line">{c.notes}</dd>
          </>
        )}
      </dl>
      <div className="grid gap-6 lg:grid-cols-2">
        <section aria-labelledby="metrics-heading" className="sheet p-3 sm:p-5">
          <h2 id="metrics-heading" className="mb-2">
            Computed
          </h2>
          <Metrics coupon={c} />
        </section>
        <section aria-labelledby="readings-heading" className="sheet p-3 sm:p-5">
          <h2 id="readings-heading" className="mb-2">
            Readings by stage
          </h2>
          <Readings coupon={c} />
        </section>
      </div>
      {can('technician') && (
        <section aria-labelledby="entry-heading" className="sheet mt-6 p-3 sm:p-5">
          <h2 id="entry-heading" className="mb-3">
            Enter readings
          </h2>
          <div className="grid gap-4 lg:grid-cols-2">
            <WeighingForm key={`w-${weigh ?? ''}`} coupon={c} initialStage={weigh} />
            <DimensionForm coupon={c} />
            <HardnessForm coupon={c} />
            <MoistureForm coupon={c} />
            <div className="lg:col-span-2">
              <SoakTestForm coupon={c} />
            </div>
          </div>
        </section>
      )}
      <CouponPhotos coupon={c} />
      <CouponHistoryPanel couponId={c.id} />
    </Page>
  );
}
