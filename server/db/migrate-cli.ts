import path from 'node:path';
import { loadConfig } from '../env';
import { openDatabase } from './client';

// Opening the database applies every committed migration in drizzle/.
const config = loadConfig();
const file = path.join(config.dataDir, 'lumenbook.db');
openDatabase(file).close();
console.log(`Migrated ${file}`);
