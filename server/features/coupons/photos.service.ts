import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import type { Response } from 'express';
import multer from 'multer';
import type { FeatureDeps } from '../../deps';
import { writeAudit } from '../../db/audit';
import { NotFound, PayloadTooLarge, Unprocessable, ValidationFailed } from '../../http/errors';
import type { AuthedRequest } from '../../http/types';
import { zodFieldErrors } from '../../http/zod-errors';
import type { User } from '../../../shared/schemas/auth';
import { photoFieldsSchema, type PhotoOut } from '../../../shared/schemas/runs';
import { toPhotoOut } from '../../db/photo-out';
import { findCoupon, findPhoto, findRunRow, insertPhoto } from './coupons.repo';

export const MAX_PHOTO_BYTES = 8 * 1024 * 1024;

export interface ImageType {
  mime: 'image/jpeg' | 'image/png' | 'image/webp';
  ext: 'jpg' | 'png' | 'webp';
}

/**
 * The image type from the file's first bytes, never from its name or the client's MIME type:
 * JPEG starts FF D8 FF (JFIF/Exif SOI marker), PNG with its 8-byte signature 89 50 4E 47 0D 0A 1A 0A
 * (PNG spec §5.2), WebP with a RIFF header whose form type at offset 8 is "WEBP".
 */
export function sniffImage(buf: Buffer): ImageType | null {
  if (buf.length >= 3 && buf[0] === 0xff && buf[1] === 0xd8 && buf[2] === 0xff) return { mime: 'image/jpeg', ext: 'jpg' };
  const png = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
  if (buf.length >= 8 && png.every((b, i) => buf[i] === b)) return { mime: 'image/png', ext: 'png' };
  if (buf.length >= 12 && buf.toString('latin1', 0, 4) === 'RIFF' && buf.toString('latin1', 8, 12) === 'WEBP') return { mime: 'image/webp', ext: 'webp' };
  return null;
}

export function createPhotoService(deps: FeatureDeps) {
  const { db } = deps.database;
  const dir = path.join(deps.config.dataDir, 'photos');
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: MAX_PHOTO_BYTES, files: 1, fields: 5, fieldSize: 1000, parts: 8 },
  }).single('file');

  function receive(req: AuthedRequest, res: Response): Promise<void> {
    return new Promise((resolve, reject) => {
      upload(req, res, (err: unknown) => {
        if (!err) return resolve();
        if (err instanceof multer.MulterError) {
          const name = (err as multer.MulterError & { filename?: string }).filename ?? 'The file';
          if (err.code === 'LIMIT_FILE_SIZE') {
            const msg = `${name} is larger than the ${MAX_PHOTO_BYTES / 1024 / 1024} MB limit for a photo`;
            return reject(new PayloadTooLarge(msg, { file: [msg] }));
          }
          const field = err.field ?? 'file';
          return reject(new ValidationFailed(`Upload refused: ${err.message}`, { [field]: [err.message] }));
        }
        // Anything else while reading a body held in memory is the body itself: a missing boundary, a
        // truncated body, a malformed part header (busboy's errors). The client's to fix, so a 400.
        const msg = err instanceof Error ? err.message : 'unreadable multipart body';
        reject(new ValidationFailed(`The upload is not a well-formed multipart form: ${msg}`, { file: [`Malformed upload: ${msg}`] }));
      });
    });
  }

  /** Takes one multipart upload (field `file`, optional `kind`, `caption`) for a coupon or a run. */
  async function upload_(actor: User, owner: { couponId: number } | { runId: number }, req: AuthedRequest, res: Response): Promise<{ photo: PhotoOut }> {
    // The body is read first even for a missing owner, so the client is not cut off mid-upload.
    await receive(req, res);
    if ('couponId' in owner ? !findCoupon(db, owner.couponId) : !findRunRow(db, owner.runId)) {
      throw new NotFound('couponId' in owner ? 'Coupon' : 'Run');
    }
    const fields = photoFieldsSchema.safeParse({ ...(req.body ?? {}) });
    if (!fields.success) throw new ValidationFailed('Invalid photo fields', zodFieldErrors(fields.error));
    const file = req.file;
    if (!file) throw new ValidationFailed('Attach an image in the form field "file"', { file: ['Attach a JPEG, PNG or WebP image'] });
    const type = sniffImage(file.buffer);
    const reencoded = type ? await reencode(file.buffer, type) : null;
    if (!type || !reencoded) {
      const msg = `${file.originalname} is not a JPEG, PNG or WebP image (judged by its content, not its name)`;
      throw new Unprocessable(msg, { file: [msg] });
    }
    fs.mkdirSync(dir, { recursive: true, mode: 0o700 });
    const fileName = `${crypto.randomBytes(16).toString('hex')}.${type.ext}`;
    const full = path.join(dir, fileName);
    try {
      // Owner-only; on a failed write (a full disk) the partly written file is removed below.
      await fs.promises.writeFile(full, reencoded, { flag: 'wx', mode: 0o600 });
      const row = db.transaction((tx) => {
        const r = insertPhoto(tx, {
          couponId: 'couponId' in owner ? owner.couponId : null,
          runId: 'runId' in owner ? owner.runId : null,
          kind: fields.data.kind,
          fileName,
          // Control characters (a NUL…) have no business in a name shown on screen.
          originalName: file.originalname.replace(/[\u0000-\u001f\u007f]/g, '').slice(0, 200),
          mimeType: type.mime,
          bytes: reencoded.length,
          sha256: crypto.createHash('sha256').update(reencoded).digest('hex'),
          caption: fields.data.caption ?? null,
          createdBy: actor.id,
        });
        writeAudit(tx, { actorId: actor.id, action: 'create', entity: 'photo', entityId: r.id, after: r });
        return r;
      });
      return { photo: toPhotoOut(row) };
    } catch (e) {
      fs.rmSync(full, { force: true });
      throw e;
    }
  }

  /** The stored bytes with the type found at upload; nosniff so a browser never second-guesses it. */
  async function serve(id: number, res: Response): Promise<void> {
    const p = findPhoto(db, id);
    if (!p) throw new NotFound('Photo');
    let bytes: Buffer;
    try {
      bytes = await fs.promises.readFile(path.join(dir, path.basename(p.fileName)));
    } catch {
      throw new NotFound('Photo file');
    }
    res.setHeader('Content-Type', p.mimeType);
    res.setHeader('X-Content-Type-Options', 'nosniff');
    res.setHeader('Content-Disposition', `inline; filename="photo-${p.id}.${path.extname(p.fileName).slice(1)}"`);
    res.setHeader('Cache-Control', 'private, max-age=3600');
    res.status(200).end(bytes);
  }

  return { upload: upload_, serve };
}

/**
 * Decodes the whole image with sharp (libvips) and encodes it again in the same format, so what is
 * stored is pixels we produced: a file that only starts like an image (a PNG signature followed by
 * HTML) does not decode and is refused, and the camera's metadata (EXIF with GPS position, maker
 * notes, comments) is not carried over, because sharp writes none unless asked. The EXIF orientation
 * is applied to the pixels first, so a portrait photo stays upright without it. Null when it does not
 * decode or is not of the type its signature claims.
 */
async function reencode(input: Buffer, type: ImageType): Promise<Buffer | null> {
  // sharp (and libvips, a shared library of its own) is loaded with the first photo, not at start: it adds
  // several MB to the resident memory of a server that may never receive one (bench/server-memory.ts).
  const { default: sharp } = await import('sharp');
  try {
    const image = sharp(input, { failOn: 'error', limitInputPixels: 60_000_000 });
    const meta = await image.metadata();
    const format = { jpg: 'jpeg', png: 'png', webp: 'webp' }[type.ext];
    if (meta.format !== format) return null;
    const upright = image.rotate();
    if (type.ext === 'jpg') return await upright.jpeg({ quality: 90 }).toBuffer();
    if (type.ext === 'png') return await upright.png().toBuffer();
    return await upright.webp({ quality: 90 }).toBuffer();
  } catch {
    return null;
  }
}
