import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import * as tar from 'tar';
import { DatabaseInUse, openSqlite } from './client';

/**
 * Backups are one gzipped tar archive (the tar package, POSIX ustar/pax) holding everything a shop
 * needs to come back: `lumenbook.db`, a consistent copy taken with SQLite's online backup API while
 * the app keeps running, the `photos/` folder, and `manifest.json` saying what it is. No secrets: the
 * session secret is not in it (restored shops just sign in again).
 */
export const DATABASE_FILE = 'lumenbook.db';
export const PHOTOS_DIR = 'photos';
const MANIFEST = 'manifest.json';
const FORMAT = 'lumenbook-backup';

interface Manifest {
  format: typeof FORMAT;
  version: 1;
  createdAt: string;
  photos: number;
}

function tempDir(dataDir: string, label: string): string {
  const dir = path.join(dataDir, `.${label}-${crypto.randomBytes(6).toString('hex')}`);
  fs.mkdirSync(dir, { recursive: false, mode: 0o700 });
  return dir;
}

function photoNames(photosDir: string): string[] {
  if (!fs.existsSync(photosDir)) return [];
  return fs
    .readdirSync(photosDir, { withFileTypes: true })
    .filter((e) => e.isFile())
    .map((e) => e.name);
}

/**
 * Writes `backups/<name>.tar.gz` (0600, in a 0700 folder) from the open database and DATA_DIR's photos.
 * The archive is written under a temporary name and renamed when complete, so a failure (a full disk)
 * leaves no half archive that looks like a backup.
 */
export async function createBackup(sqlite: Database.Database, dataDir: string, now: Date): Promise<{ file: string; bytes: number; photos: number }> {
  const backups = path.join(dataDir, 'backups');
  fs.mkdirSync(backups, { recursive: true, mode: 0o700 });
  const name = `lumenbook-${now.toISOString().replace(/[:.]/g, '-')}.tar.gz`;
  const target = path.join(backups, name);
  const partial = `${target}.partial`;
  const staging = tempDir(dataDir, 'backup');
  try {
    await sqlite.backup(path.join(staging, DATABASE_FILE));
    fs.chmodSync(path.join(staging, DATABASE_FILE), 0o600);
    // Photos are linked into the staging folder, not copied: same file system, no extra space.
    const photos = photoNames(path.join(dataDir, PHOTOS_DIR));
    fs.mkdirSync(path.join(staging, PHOTOS_DIR), { mode: 0o700 });
    for (const p of photos) {
      const from = path.join(dataDir, PHOTOS_DIR, p);
      const to = path.join(staging, PHOTOS_DIR, p);
      try {
        fs.linkSync(from, to);
      } catch {
        fs.copyFileSync(from, to);
      }
    }
    const manifest: Manifest = { format: FORMAT, version: 1, createdAt: now.toISOString(), photos: photos.length };
    fs.writeFileSync(path.join(staging, MANIFEST), JSON.stringify(manifest, null, 2), { mode: 0o600 });
    await tar.c({ gzip: true, file: partial, cwd: staging, portable: true, mode: 0o600 } as tar.TarOptionsWithAliasesAsyncFile, [
      MANIFEST,
      DATABASE_FILE,
      PHOTOS_DIR,
    ]);
    fs.chmodSync(partial, 0o600);
    fs.renameSync(partial, target);
    return { file: path.relative(dataDir, target), bytes: fs.statSync(target).size, photos: photos.length };
  } catch (err) {
    fs.rmSync(partial, { force: true });
    throw err;
  } finally {
    fs.rmSync(staging, { recursive: true, force: true });
  }
}

/** What an archive may hold: the manifest, the database, and plain files directly under photos/. */
function allowedEntry(entryPath: string, type: string): boolean {
  const p = entryPath.replace(/^\.\//, '').replace(/\/$/, '');
  if (type === 'Directory') return p === PHOTOS_DIR;
  if (type !== 'File' && type !== 'OldFile' && type !== 'ContiguousFile') return false;
  if (p === MANIFEST || p === DATABASE_FILE) return true;
  const [dir, name, ...rest] = p.split('/');
  return dir === PHOTOS_DIR && !!name && rest.length === 0 && /^[A-Za-z0-9._-]+$/.test(name) && !name.startsWith('.');
}

function checkDatabase(file: string): void {
  const probe = new Database(file, { readonly: true, fileMustExist: true });
  try {
    const result = probe.pragma('integrity_check', { simple: true });
    if (result !== 'ok') throw new Error(`The backup fails SQLite's integrity check: ${String(result)}`);
    const hasUsers = probe.prepare("SELECT count(*) AS n FROM sqlite_master WHERE type = 'table' AND name = 'users'").get() as { n: number };
    if (hasUsers.n !== 1) throw new Error('This file is not a Lumenbook database (no users table)');
  } finally {
    probe.close();
  }
}

/**
 * Puts a backup in place of DATA_DIR's database and photos. Accepts the archive made by createBackup
 * (and, from older installations, a bare `.db` file, which restores the database only).
 *
 * - The server must be stopped: the live database is opened with an exclusive lock first, and if a
 *   running server holds it the restore is refused (DatabaseInUse) before anything is touched;
 *   otherwise the running server would keep its pages and silently write the old state back.
 * - The replaced database is kept as `lumenbook.db.before-restore`, copied with the backup API, so
 *   what was still in the WAL after an unclean stop is in it; replaced photos go to
 *   `photos.before-restore/`.
 * - The archive is unpacked into a temporary folder and checked (`PRAGMA integrity_check`, a users
 *   table) before anything is moved; only the expected entries are taken (no links, no paths outside).
 */
export async function restoreBackup(backupFile: string, dataDir: string): Promise<{ replaced: string | null; photos: number }> {
  if (!fs.existsSync(backupFile)) throw new Error(`No backup file at ${backupFile}`);
  fs.mkdirSync(dataDir, { recursive: true, mode: 0o700 });
  const staging = tempDir(dataDir, 'restore');
  try {
    const isArchive = /\.(tar\.gz|tgz|tar)$/i.test(backupFile);
    if (isArchive) {
      await tar.x({
        file: backupFile,
        cwd: staging,
        strict: true,
        preserveOwner: false,
        filter: (p, entry) => allowedEntry(p, (entry as tar.ReadEntry).type),
      });
      const manifestFile = path.join(staging, MANIFEST);
      const manifest = fs.existsSync(manifestFile) ? (JSON.parse(fs.readFileSync(manifestFile, 'utf8')) as Partial<Manifest>) : null;
      if (manifest?.format !== FORMAT) throw new Error('This archive is not a Lumenbook backup (no manifest)');
      if (!fs.existsSync(path.join(staging, DATABASE_FILE))) throw new Error('This backup holds no database');
    } else {
      fs.copyFileSync(backupFile, path.join(staging, DATABASE_FILE));
    }
    const stagedDb = path.join(staging, DATABASE_FILE);
    checkDatabase(stagedDb);

    const live = path.join(dataDir, DATABASE_FILE);
    let replaced: string | null = null;
    if (fs.existsSync(live)) {
      // Throws DatabaseInUse while a server holds it. Opening also replays a WAL left by an unclean stop.
      const current = openSqlite(live);
      try {
        replaced = `${live}.before-restore`;
        fs.rmSync(replaced, { force: true });
        await current.backup(replaced);
        fs.chmodSync(replaced, 0o600);
      } finally {
        current.close();
      }
    }
    for (const suffix of ['-wal', '-shm']) fs.rmSync(`${live}${suffix}`, { force: true });
    fs.chmodSync(stagedDb, 0o600);
    fs.renameSync(stagedDb, live);

    let photos = 0;
    const stagedPhotos = path.join(staging, PHOTOS_DIR);
    if (isArchive) {
      const livePhotos = path.join(dataDir, PHOTOS_DIR);
      if (fs.existsSync(livePhotos)) {
        const kept = `${livePhotos}.before-restore`;
        fs.rmSync(kept, { recursive: true, force: true });
        fs.renameSync(livePhotos, kept);
      }
      if (fs.existsSync(stagedPhotos)) {
        fs.chmodSync(stagedPhotos, 0o700);
        for (const p of photoNames(stagedPhotos)) fs.chmodSync(path.join(stagedPhotos, p), 0o600);
        photos = photoNames(stagedPhotos).length;
        fs.renameSync(stagedPhotos, livePhotos);
      } else {
        fs.mkdirSync(livePhotos, { mode: 0o700 });
      }
    }
    return { replaced, photos };
  } finally {
    fs.rmSync(staging, { recursive: true, force: true });
  }
}

export { DatabaseInUse };
