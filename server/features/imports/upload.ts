import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import type { Request, Response } from 'express';
import multer from 'multer';
import { IMPORT_EXTENSIONS, MAX_IMPORT_BYTES } from '../../../shared/constants/imports';
import { PayloadTooLarge, ValidationFailed } from '../../http/errors';

export interface ReceivedFile {
  originalName: string;
  /** Where the upload was written (a temporary name under the imports folder). */
  path: string;
  bytes: number;
  sha256: string;
}

/**
 * A multer storage engine that writes the upload straight to disk while hashing it, so a 50 MB file
 * never sits in memory. multer calls `_removeFile` for a file cut off by the size limit or an abort.
 */
function hashingStorage(dir: string): multer.StorageEngine {
  return {
    _handleFile(_req, file, cb) {
      fs.mkdirSync(dir, { recursive: true });
      const target = path.join(dir, `upload-${crypto.randomBytes(12).toString('hex')}.part`);
      const hash = crypto.createHash('sha256');
      let bytes = 0;
      file.stream.on('data', (chunk: Buffer) => {
        hash.update(chunk);
        bytes += chunk.length;
      });
      pipeline(file.stream, fs.createWriteStream(target, { flags: 'wx' })).then(
        () => cb(null, { path: target, size: bytes, sha256: hash.digest('hex') } as Partial<Express.Multer.File>),
        (err: Error) => {
          fs.rm(target, { force: true }, () => cb(err));
        },
      );
    },
    _removeFile(_req, file, cb) {
      fs.rm(file.path, { force: true }, () => cb(null));
    },
  };
}

export function createReceiver(dir: string) {
  const upload = multer({
    storage: hashingStorage(dir),
    limits: { fileSize: MAX_IMPORT_BYTES, files: 1, fields: 5, fieldSize: 1000, parts: 8 },
    fileFilter(_req, file, cb) {
      const ext = path.extname(file.originalname).toLowerCase();
      if ((IMPORT_EXTENSIONS as readonly string[]).includes(ext)) return cb(null, true);
      const msg = `${file.originalname} is not a .csv, .txt or .tsv file; save the scale's readings as text first`;
      cb(new ValidationFailed(msg, { file: [msg] }));
    },
  }).single('file');

  /** Takes one multipart upload in the field `file`; answers where it was written, its size and SHA-256. */
  return function receive(req: Request, res: Response): Promise<ReceivedFile> {
    return new Promise((resolve, reject) => {
      upload(req, res, (err: unknown) => {
        if (err instanceof multer.MulterError) {
          if (err.code === 'LIMIT_FILE_SIZE') {
            const msg = `The file is larger than the ${MAX_IMPORT_BYTES / 1024 / 1024} MB limit for an import; split it into smaller files`;
            return reject(new PayloadTooLarge(msg, { file: [msg] }));
          }
          return reject(new ValidationFailed(`Upload refused: ${err.message}`, { [err.field ?? 'file']: [err.message] }));
        }
        if (err) return reject(err);
        const f = req.file as (Express.Multer.File & { sha256: string }) | undefined;
        if (!f) return reject(new ValidationFailed('Attach the file in the form field "file"', { file: ['Choose a .csv, .txt or .tsv file'] }));
        resolve({ originalName: f.originalname.slice(0, 200), path: f.path, bytes: f.size, sha256: f.sha256 });
      });
    });
  };
}
