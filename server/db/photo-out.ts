import type { PhotoOut } from '../../shared/schemas/runs';
import type { photos } from './schema/coupons';

/** A photo row as the API answers it; coupons and runs both list photos, and both serve them at one URL. */
export function toPhotoOut(p: typeof photos.$inferSelect): PhotoOut {
  return {
    id: p.id,
    couponId: p.couponId,
    runId: p.runId,
    kind: p.kind,
    originalName: p.originalName,
    mimeType: p.mimeType,
    bytes: p.bytes,
    caption: p.caption,
    createdAt: p.createdAt,
    url: `/api/photos/${p.id}`,
  };
}
