import fs from 'node:fs';
import { Worker } from 'node:worker_threads';

/**
 * Writes the demo data into a database that does not exist yet, in a worker thread (server/db/seed-worker.ts),
 * so that what the seed loads (jsdom and Plot, for the demo finding's plot) is not held by the server for
 * the rest of its life. True when it wrote the demo. Any other case (the file exists, the thread fails) answers
 * false and leaves the seed to the caller, in process, where an error is reported as it always was.
 */
export async function seedFreshDemoApart(file: string): Promise<boolean> {
  if (fs.existsSync(file)) return false;
  // From the bundle (dist/server/index.mjs) the worker is its own bundle beside it; from the sources, tsx
  // is registered in the thread first.
  const bundled = import.meta.url.endsWith('.mjs');
  const worker = bundled
    ? new Worker(new URL('./seed-worker.mjs', import.meta.url), { workerData: { file } })
    : new Worker(new URL('./tsx-worker.mjs', import.meta.url), { workerData: { file, entry: new URL('./db/seed-worker.ts', import.meta.url).href } });
  return new Promise<boolean>((resolve) => {
    let seeded = false;
    worker.on('message', (m: boolean) => (seeded = m));
    worker.on('error', () => resolve(false));
    worker.on('exit', () => resolve(seeded));
  });
}
