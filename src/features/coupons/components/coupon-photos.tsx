import { useId, useState, type FormEvent } from 'react';
import { PHOTO_KINDS, type PhotoKind } from '../../../../shared/constants/records';
import type { CouponDetail } from '../../../../shared/schemas/coupons';
import { ApiError } from '../../../lib/api-client';
import { useRole } from '../../../lib/use-role';
import { useUploadCouponPhoto } from '../api/use-coupon-mutations';

const KIND_LABELS: Record<PhotoKind, string> = { before: 'Before', after: 'After', 'cut-section': 'Cut section' };

/** Reminder beside the cut-section photos, which are made by sawing and sanding the coupon. */
function DustCaution() {
  return (
    <aside aria-label="Caution" className="my-3 rounded border-2 border-amber-ink bg-amber-light/40 px-4 py-3 text-sm">
      <p className="font-semibold">Caution</p>
      <p>
        Cutting or sanding a coupon to show its section makes fine dust, from the wood and from cured resin. Work with dust extraction and wear a respirator; some species
        (many exotics among them) are sensitizers, and reactions can grow worse with every exposure. The resin maker's safety data sheet and local rules govern; this is only a
        reminder.
      </p>
    </aside>
  );
}

export function CouponPhotos({ coupon }: { coupon: CouponDetail }) {
  const { can } = useRole();
  const upload = useUploadCouponPhoto(coupon.id);
  const id = useId();
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);

  const onSubmit = async (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const formEl = e.currentTarget;
    setError(null);
    setDone(null);
    const data = new FormData(formEl);
    const file = data.get('file');
    if (!(file instanceof File) || file.size === 0) {
      setError('Choose an image first');
      return;
    }
    if (!String(data.get('caption') ?? '').trim()) data.delete('caption');
    try {
      await upload.mutateAsync(data);
      setDone(`Uploaded ${file.name}.`);
      formEl.reset();
    } catch (err) {
      setError(err instanceof ApiError ? (err.fieldErrors.file?.[0] ?? err.fieldErrors.kind?.[0] ?? err.fieldErrors.caption?.[0] ?? err.message) : 'The upload failed; try again');
    }
  };

  return (
    <section aria-labelledby={`${id}-h`} className="sheet mt-6 p-5">
      <h2 id={`${id}-h`} className="mb-2">
        Photos
      </h2>
      {coupon.photos.length === 0 ? (
        <p className="text-sm text-ink-soft">No photos yet.</p>
      ) : (
        <ul className="mb-3 grid grid-cols-2 gap-3 sm:grid-cols-4">
          {coupon.photos.map((p) => (
            <li key={p.id}>
              <a href={p.url} target="_blank" rel="noreferrer">
                <img src={p.url} alt={p.caption ?? `${KIND_LABELS[p.kind]} photo of ${coupon.tag}`} loading="lazy" className="aspect-square w-full rounded border border-paper-edge object-cover" />
              </a>
              <p className="text-xs text-ink-soft">
                {KIND_LABELS[p.kind]}
                {p.caption ? ` · ${p.caption}` : ''}
              </p>
            </li>
          ))}
        </ul>
      )}
      <DustCaution />
      {can('technician') && (
        <form onSubmit={(e) => void onSubmit(e)} noValidate aria-label="Add a photo of the coupon" className="grid gap-3 text-sm sm:grid-cols-[2fr_1fr_2fr_auto] sm:items-end">
          <div>
            <label htmlFor={`${id}-file`} className="field-label">
              Image (JPEG, PNG or WebP, up to 8 MB)
            </label>
            <input id={`${id}-file`} name="file" type="file" accept="image/*" className="mt-1 block w-full text-sm" aria-describedby={error ? `${id}-err` : undefined} />
          </div>
          <div>
            <label htmlFor={`${id}-kind`} className="field-label">
              Kind
            </label>
            <select id={`${id}-kind`} name="kind" className="field-input" defaultValue="before">
              {PHOTO_KINDS.map((k) => (
                <option key={k} value={k}>
                  {KIND_LABELS[k]}
                </option>
              ))}
            </select>
          </div>
          <div>
            <label htmlFor={`${id}-cap`} className="field-label">
              Caption (optional)
            </label>
            <input id={`${id}-cap`} name="caption" maxLength={200} className="field-input" />
          </div>
          <button type="submit" className="btn-quiet" disabled={upload.isPending}>
            {upload.isPending ? 'Uploading…' : 'Upload'}
          </button>
          {error && (
            <p id={`${id}-err`} role="alert" className="text-margin sm:col-span-4">
              {error}
            </p>
          )}
          {done && (
            <p role="status" className="text-moss sm:col-span-4">
              {done}
            </p>
          )}
        </form>
      )}
    </section>
  );
}
