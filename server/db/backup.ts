import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';

/**
 * Puts a backup file in place of the live database. The server must be stopped: SQLite's WAL files
 * of the old database are removed so they cannot be replayed over the restored one. The backup is
 * checked with `PRAGMA integrity_check` before anything is touched, and the replaced file is kept
 * beside it as `<name>.before-restore`.
 */
export function restoreBackup(backupFile: string, databaseFile: string): { replaced: string | null } {
  if (!fs.existsSync(backupFile)) throw new Error(`No backup file at ${backupFile}`);
  const probe = new Database(backupFile, { readonly: true, fileMustExist: true });
  try {
    const result = probe.pragma('integrity_check', { simple: true });
    if (result !== 'ok') throw new Error(`The backup fails SQLite's integrity check: ${String(result)}`);
    const hasUsers = probe.prepare("SELECT count(*) AS n FROM sqlite_master WHERE type = 'table' AND name = 'users'").get() as { n: number };
    if (hasUsers.n !== 1) throw new Error('This file is not a Lumenbook database (no users table)');
  } finally {
    probe.close();
  }
  fs.mkdirSync(path.dirname(databaseFile), { recursive: true });
  let replaced: string | null = null;
  if (fs.existsSync(databaseFile)) {
    replaced = `${databaseFile}.before-restore`;
    fs.copyFileSync(databaseFile, replaced);
  }
  for (const suffix of ['-wal', '-shm']) fs.rmSync(`${databaseFile}${suffix}`, { force: true });
  fs.copyFileSync(backupFile, databaseFile);
  return { replaced };
}
