import fs from 'node:fs';
import path from 'node:path';

/**
 * Makes sure DATA_DIR exists (created owner-only, 0700) and can really be written, by writing and
 * removing a small file. A read-only or full data folder is said plainly at start, instead of a server
 * that answers health checks while every write fails.
 */
export function prepareDataDir(dir: string): void {
  const probe = path.join(dir, `.write-probe-${process.pid}`);
  try {
    fs.mkdirSync(dir, { recursive: true, mode: 0o700 });
    const fd = fs.openSync(probe, 'w', 0o600);
    try {
      fs.writeSync(fd, 'lumenbook write probe\n');
      fs.fsyncSync(fd);
    } finally {
      fs.closeSync(fd);
    }
    fs.rmSync(probe, { force: true });
  } catch (err) {
    const code = (err as { code?: string }).code ?? 'error';
    const why =
      code === 'ENOSPC' || code === 'EDQUOT'
        ? 'the disk is full'
        : code === 'EROFS'
          ? 'the disk is mounted read-only'
          : code === 'EACCES' || code === 'EPERM'
            ? 'this user may not write there'
            : code === 'ENOTDIR' || code === 'EEXIST'
              ? 'part of the path is a file, not a folder'
              : `the system said ${code}`;
    throw new Error(`DATA_DIR ${dir} cannot be written: ${why}. Lumenbook keeps its database, photos and backups there; point DATA_DIR at a writable folder.`, {
      cause: err,
    });
  }
}
