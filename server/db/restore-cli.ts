import path from 'node:path';
import { loadConfig } from '../env';
import { restoreBackup } from './backup';
import { openDatabase } from './client';

// Usage: npm run restore -- <backup file>   (stop the server first)
const file = process.argv[2];
if (!file) {
  console.error('Usage: npm run restore -- <backup file, e.g. data/backups/lumenbook-….db>');
  process.exit(2);
}
const config = loadConfig();
const target = path.join(config.dataDir, 'lumenbook.db');
const { replaced } = restoreBackup(path.resolve(file), target);
// Opening applies any migration newer than the backup, so an old backup comes up to date.
openDatabase(target).close();
console.log(`Restored ${file} into ${target}${replaced ? ` (the previous file is kept as ${replaced})` : ''}`);
