import path from 'node:path';
import { loadConfig } from '../env';
import { openDatabase } from './client';
import { DEMO_PASSWORD, DEMO_USERS, seedDemo } from '../seed';

const config = loadConfig();
const database = openDatabase(path.join(config.dataDir, 'lumenbook.db'));
const seeded = seedDemo(database);
database.close();
if (seeded) {
  console.log(`Demo data written. Sign in as ${DEMO_USERS.map((u) => u.email).join(', ')} with the password ${DEMO_PASSWORD}`);
} else {
  console.log('The database already has users; demo data not written (delete data/lumenbook.db to start over).');
}
