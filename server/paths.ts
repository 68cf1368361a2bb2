import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The project's folder (the one holding package.json). The server runs from its sources (server/…, through
 * tsx) and from its bundle (dist/server/index.mjs, `npm start`), where every module's import.meta.url is the
 * bundle's: paths to the client build and the migrations are found from this folder, not from a file's depth.
 */
function projectRoot(from: string): string {
  for (let dir = from; ; dir = path.dirname(dir)) {
    if (fs.existsSync(path.join(dir, 'package.json'))) return dir;
    if (path.dirname(dir) === dir) throw new Error(`no package.json above ${from}`);
  }
}

export const PROJECT_ROOT = projectRoot(path.dirname(fileURLToPath(import.meta.url)));
/** The client's production build (vite.config.ts: build.outDir). */
export const CLIENT_DIR = path.join(PROJECT_ROOT, 'dist/client');
/** Drizzle's committed migrations. */
export const MIGRATIONS_FOLDER = path.join(PROJECT_ROOT, 'drizzle');
