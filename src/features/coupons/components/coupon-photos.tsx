import type { CouponDetail } from '../../../../shared/schemas/coupons';
import { PhotoPanel } from '../../../components/ui/photo-panel';
import { useRole } from '../../../lib/session';
import { useUploadCouponPhoto } from '../api/use-coupon-mutations';

/** Reminder beside the cut-section photos, which are made by sawing and sanding the coupon. */
function DustCaution() {
  return (
    <aside aria-label="Caution" className="my-3 rounded border-2 border-amber-ink bg-amber-light/40 px-4 py-3 text-sm">
      <p className="font-semibold">Caution</p>
      <p>
        Cutting or sanding a coupon to show its section makes fine dust, from the wood and from cured resin. Work with dust extraction and wear a respirator;
        some species (many exotics among them) are sensitizers, and reactions can grow worse with every exposure. The resin maker's safety data sheet and local
        rules govern; this is only a reminder.
      </p>
    </aside>
  );
}

export function CouponPhotos({ coupon }: { coupon: CouponDetail }) {
  const { can } = useRole();
  const upload = useUploadCouponPhoto(coupon.id);
  return (
    <div className="mt-6">
      <PhotoPanel
        title="Photos"
        subject={`coupon ${coupon.tag}`}
        photos={coupon.photos}
        canUpload={can('technician')}
        upload={(data) => upload.mutateAsync(data)}
        uploading={upload.isPending}
      >
        <DustCaution />
      </PhotoPanel>
    </div>
  );
}
