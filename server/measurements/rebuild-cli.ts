import path from 'node:path';
import { loadConfig } from '../env';
import { openDatabase } from '../db/client';
import { rebuildResults } from './results';

// Rewrites coupon_results from the readings, in one transaction (readers see the old table until it commits).
const config = loadConfig();
const file = path.join(config.dataDir, 'lumenbook.db');
const database = openDatabase(file);
const started = performance.now();
const n = database.db.transaction((tx) => rebuildResults(tx));
database.close();
console.log(`Rebuilt coupon_results of ${file}: ${n} coupons in ${Math.round(performance.now() - started)} ms`);
