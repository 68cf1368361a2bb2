import fs from 'node:fs';
import path from 'node:path';
import { afterEach, beforeEach, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { startHarness, type Harness } from '../testing/harness';
import { openDatabase } from './client';
import { restoreBackup } from './backup';
import { users } from './schema/auth';

let h: Harness;
beforeEach(async () => {
  h = await startHarness();
});
afterEach(async () => {
  await h.close();
});

it('an online backup restores into a working database, and a broken file is refused', async () => {
  const admin = await h.signIn('admin@demo.test');
  const made = await admin.post('/api/admin/backup');
  expect(made.status).toBe(201);
  const backupFile = path.join(h.dir, made.body.file);

  // Change the live database after the backup: the restore must bring back the earlier state.
  h.database.db.update(users).set({ name: 'Changed after the backup' }).where(eq(users.email, 'tech@demo.test')).run();

  const target = path.join(h.dir, 'restored', 'lumenbook.db');
  fs.mkdirSync(path.dirname(target), { recursive: true });
  fs.writeFileSync(target, 'an older file');
  const { replaced } = restoreBackup(backupFile, target);
  expect(replaced && fs.readFileSync(replaced, 'utf8')).toBe('an older file');

  const restored = openDatabase(target);
  try {
    const tech = restored.db.select().from(users).where(eq(users.email, 'tech@demo.test')).get();
    expect(tech?.name).not.toBe('Changed after the backup');
    expect(restored.db.select().from(users).all()).toHaveLength(4);
  } finally {
    restored.close();
  }

  const junk = path.join(h.dir, 'junk.db');
  fs.writeFileSync(junk, 'not a database at all');
  expect(() => restoreBackup(junk, target)).toThrow();
});
