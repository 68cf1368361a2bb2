// Starts a TypeScript worker thread when the server runs its sources through tsx (`npm run dev`), whose
// loader worker threads do not inherit: register it in this thread, then load the entry named in workerData.
// The production bundle starts its workers' own bundles instead (scripts/build-server.ts).
import { workerData } from 'node:worker_threads';
import { register } from 'tsx/esm/api';

register();
await import(workerData.entry);
