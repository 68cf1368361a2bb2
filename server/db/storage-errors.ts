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
