import path from 'node:path';
import { loadConfig } from '../env';
import { DatabaseInUse, restoreBackup } from './backup';
import { openDatabase } from './client';

// Usage: npm run restore -- <backup archive>   (stop the server first; a running one is detected)
const file = process.argv[2];
if (!file) {
  console.error('Usage: npm run restore -- <backup, e.g. data/backups/lumenbook-….tar.gz>');
  process.exit(2);
}
const config = loadConfig();
try {
  const { replaced, photos } = await restoreBackup(path.resolve(file), config.dataDir);
  // Opening applies any migration newer than the backup, so an old backup comes up to date.
  openDatabase(path.join(config.dataDir, 'lumenbook.db')).close();
  console.log(`Restored ${file} into ${config.dataDir} (${photos} photos)${replaced ? `; the previous database is kept as ${replaced}` : ''}`);
} catch (err) {
  if (err instanceof DatabaseInUse) {
    console.error(`Not restored: ${err.message}`);
    process.exit(1);
  }
  console.error(`Not restored: ${(err as Error).message}`);
  process.exit(1);
}
