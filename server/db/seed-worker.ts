import { parentPort, workerData } from 'node:worker_threads';
import { openDatabase } from './client';
import { seedDemo } from '../seed';

/**
 * The demo's first seed, in a worker thread started by server/index.ts on a fresh DATA_DIR. Drawing the demo
 * finding's frozen plot loads jsdom and Plot (~80 MB of resident memory that a module cache never gives
 * back); in a thread of its own, they go when the thread ends, before the server takes the database.
 */
const database = openDatabase((workerData as { file: string }).file);
try {
  parentPort!.postMessage(seedDemo(database));
} finally {
  database.close();
}
