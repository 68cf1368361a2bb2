import { useId, useState, type FormEvent, type ReactNode } from 'react';
import { PHOTO_KINDS, type PhotoKind } from '../../../shared/constants/records';
import { ApiError } from '../../lib/api-client';

export const PHOTO_KIND_LABELS: Record<PhotoKind, string> = { before: 'Before', after: 'After', 'cut-section': 'Cut section' };

interface Photo {
  id: number;
  url: string;
  kind: PhotoKind;
  caption: string | null;
  originalName: string;
}

interface PhotoPanelProps {
  title: string;
  /** What the photos show, for alt text when a photo has no caption ("coupon T26-001-…"). */
  subject: string;
  photos: readonly Photo[];
  canUpload: boolean;
  upload: (data: FormData) => Promise<unknown>;
  uploading: boolean;
  /** Shown between the thumbnails and the upload form (e.g. a caution). */
  children?: ReactNode;
}

/** Thumbnails and an upload form for the photos of a coupon or a run (multipart `file`, `kind`, `caption`). */
export function PhotoPanel({ title, subject, photos, canUpload, upload, uploading, children }: PhotoPanelProps) {
  const id = useId();
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);

  const onSubmit = async (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    setError(null);
    setDone(null);
    const formEl = e.currentTarget;
    const data = new FormData(formEl);
    const file = data.get('file');
    if (!(file instanceof File) || file.size === 0) {
      setError('Choose an image first');
      return;
    }
    if (!String(data.get('caption') ?? '').trim()) data.delete('caption');
    try {
      await upload(data);
      setDone(`Uploaded ${file.name}.`);
      formEl.reset();
    } catch (err) {
      setError(
        err instanceof ApiError
          ? (err.fieldErrors.file?.[0] ?? err.fieldErrors.kind?.[0] ?? err.fieldErrors.caption?.[0] ?? err.message)
          : 'The upload failed; try again',
      );
    }
  };

  return (
    <section aria-labelledby={`${id}-h`} className="sheet p-5">
      <h2 id={`${id}-h`} className="mb-2">
        {title}
      </h2>
      {photos.length === 0 ? (
        <p className="text-sm text-ink-soft">No photos yet.</p>
      ) : (
        <ul className="mb-3 grid grid-cols-2 gap-3 sm:grid-cols-3">
          {photos.map((p) => (
            <li key={p.id}>
              <a href={p.url} target="_blank" rel="noreferrer">
                <img
                  src={p.url}
                  alt={p.caption ?? `${PHOTO_KIND_LABELS[p.kind]} photo of ${subject}`}
                  loading="lazy"
                  className="aspect-square w-full rounded border border-paper-edge object-cover"
                />
              </a>
              <p className="text-xs text-ink-soft">
                {PHOTO_KIND_LABELS[p.kind]}
                {p.caption ? ` · ${p.caption}` : ''}
              </p>
            </li>
          ))}
        </ul>
      )}
      {children}
      {canUpload && (
        <form onSubmit={(e) => void onSubmit(e)} noValidate aria-label={`Add a photo of the ${subject}`} className="space-y-2 text-sm">
          <div>
            <label htmlFor={`${id}-file`} className="field-label">
              Image (JPEG, PNG or WebP, up to 8 MB)
            </label>
            <input
              id={`${id}-file`}
              name="file"
              type="file"
              accept="image/*"
              className="mt-1 block w-full text-sm"
              aria-describedby={error ? `${id}-err` : undefined}
            />
          </div>
          <div className="flex gap-2">
            <div>
              <label htmlFor={`${id}-kind`} className="field-label">
                Kind
              </label>
              <select id={`${id}-kind`} name="kind" className="field-input" defaultValue="before">
                {PHOTO_KINDS.map((k) => (
                  <option key={k} value={k}>
                    {PHOTO_KIND_LABELS[k]}
                  </option>
                ))}
              </select>
            </div>
            <div className="flex-1">
              <label htmlFor={`${id}-cap`} className="field-label">
                Caption (optional)
              </label>
              <input id={`${id}-cap`} name="caption" maxLength={200} className="field-input" />
            </div>
          </div>
          <button type="submit" className="btn-quiet" disabled={uploading}>
            {uploading ? 'Uploading…' : 'Upload'}
          </button>
          {error && (
            <p id={`${id}-err`} role="alert" className="text-margin">
              {error}
            </p>
          )}
          {done && (
            <p role="status" className="text-moss">
              {done}
            </p>
          )}
        </form>
      )}
    </section>
  );
}
