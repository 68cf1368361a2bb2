import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router-dom';
import type { CouponLabel } from '../../../../shared/schemas/trials';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { labelSheetQuery } from '../api/trials-queries';
import { ROLE_LABELS } from './labels';
import { paths } from '../../../config/paths';

// Page margins for the printer; the labels themselves have a fixed size in millimetres so they cut
// out the same on any paper.
const PRINT_CSS = '@page { margin: 10mm; }';

/** The QR code as an image: the server's SVG goes in as data, never as markup in this page. */
function qrSource(svg: string): string {
  return `data:image/svg+xml;charset=utf-8,${encodeURIComponent(svg)}`;
}

export function LabelSheetScreen() {
  const id = Number(useParams().id);
  const sheet = useQuery({ ...labelSheetQuery(id), enabled: Number.isInteger(id) && id > 0 });
  const title = sheet.data ? `Labels · ${sheet.data.trial.code}` : 'Labels';

  return (
    <Page
      title={title}
      actions={
        <>
          <button type="button" className="btn-primary" onClick={() => window.print()} disabled={!sheet.data?.labels.length}>
            Print
          </button>
          <Link to={paths.trial.href({ id: id })} className="btn-quiet no-underline">
            Back to the trial
          </Link>
        </>
      }
    >
      <style>{PRINT_CSS}</style>
      {sheet.isPending ? (
        <Loading />
      ) : sheet.isError ? (
        <ErrorNote error={sheet.error} />
      ) : sheet.data.labels.length === 0 ? (
        <p className="text-ink-soft">
          This trial has no coupons yet. Create the planned coupons on the <Link to={paths.trial.href({ id: id })}>trial's page</Link>, then come back here.
        </p>
      ) : (
        <>
          <p className="no-print mb-4 text-sm text-ink-soft">
            {sheet.data.trial.title}: {sheet.data.labels.length} label{sheet.data.labels.length === 1 ? '' : 's'}, one per coupon. Each QR code opens the
            coupon's page at <code className="break-all">{sheet.data.address.url}</code>. Cut along the dashed lines.
          </p>
          {sheet.data.address.warning && (
            <p className="no-print mb-4 rounded border border-margin px-3 py-2 text-sm text-margin" role="alert">
              {sheet.data.address.warning} An admin sets it in Settings.
            </p>
          )}
          <ul aria-label="Coupon labels" className="flex flex-wrap gap-0 print:gap-0">
            {sheet.data.labels.map((l) => (
              <LabelCard key={l.couponId} label={l} />
            ))}
          </ul>
        </>
      )}
    </Page>
  );
}

// 63.5 × 38.1 mm: three across and seven down fit an A4 or US Letter sheet with room to cut.
function LabelCard({ label }: { label: CouponLabel }) {
  return (
    <li className="flex h-[38.1mm] w-[63.5mm] break-inside-avoid flex-col border border-dashed border-ink-faint bg-white px-[2mm] py-[1.5mm] text-ink">
      <p className="font-mono text-[12pt] leading-tight font-bold whitespace-nowrap">{label.tag}</p>
      <div className="mt-[1mm] flex min-h-0 flex-1 items-start gap-[2mm]">
        <img src={qrSource(label.qrSvg)} alt={label.tag} className="h-[25mm] w-[25mm] shrink-0" />
        <div className="min-w-0 text-[8pt] leading-snug">
          <p className="font-semibold">{label.speciesName}</p>
          <p>{ROLE_LABELS[label.role]}</p>
          <p className="text-[7pt] text-ink-soft">{label.conditionLabel}</p>
        </div>
      </div>
    </li>
  );
}
