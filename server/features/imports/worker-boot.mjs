// Starts a TypeScript worker thread. The server runs under tsx, whose loader the worker threads do not
// inherit (nor do vitest's workers): register it in this thread, then load the entry named in workerData.
import { workerData } from 'node:worker_threads';
import { register } from 'tsx/esm/api';

register();
await import(workerData.entry);
