/**
 * What a storage failure was, from SQLite's or the file system's error code: a full disk
 * (SQLITE_FULL, ENOSPC, EDQUOT) or storage that cannot be written (SQLITE_READONLY*, EROFS, EACCES,
 * EPERM). Null for anything else.
 */
export function storageProblem(err: unknown): 'full' | 'read-only' | null {
  // Drizzle wraps the driver's error ("Failed to run the query …") with the SqliteError as its cause.
  for (let e = err, depth = 0; e && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    const found = problemOf((e as { code?: unknown }).code);
    if (found) return found;
  }
  return null;
}

function problemOf(code: unknown): 'full' | 'read-only' | null {
  if (typeof code !== 'string') return null;
  if (code === 'SQLITE_FULL' || code === 'ENOSPC' || code === 'EDQUOT') return 'full';
  if (code.startsWith('SQLITE_READONLY') || code === 'EROFS' || code === 'EACCES' || code === 'EPERM') return 'read-only';
  return null;
}

/**
 * True when SQLite refused because another connection holds the write lock: only an import's commit,
 * written by a worker thread of this process for a few seconds (decision 0017). The main connection does
 * not wait for it (that would block the event loop), so the request is answered "try again in a moment".
 */
export function databaseBusy(err: unknown): boolean {
  for (let e = err, depth = 0; e && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === 'string' && code.startsWith('SQLITE_BUSY')) return true;
  }
  return false;
}
