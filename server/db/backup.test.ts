import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import * as tar from 'tar';
import { afterEach, beforeEach, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { startHarness, type Harness } from '../testing/harness';
import { DatabaseInUse, restoreBackup } from './backup';
import { openDatabase } from './client';
import { users } from './schema/auth';

let h: Harness;
const extra: Harness[] = [];
const dirs: string[] = [];
beforeEach(async () => {
  h = await startHarness();
});
afterEach(async () => {
  for (const x of extra.splice(0)) await x.close();
  await h.close();
  for (const d of dirs.splice(0)) fs.rmSync(d, { recursive: true, force: true });
});

const emptyDir = () => {
  const d = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-restore-'));
  dirs.push(d);
  return d;
};

async function backupWithPhoto() {
  const admin = await h.signIn('admin@demo.test');
  const jpeg = await sharp({ create: { width: 8, height: 8, channels: 3, background: { r: 120, g: 80, b: 40 } } })
    .jpeg()
    .toBuffer();
  const photo = await admin.post('/api/coupons/1/photos').attach('file', jpeg, 'blank.jpg');
  expect(photo.status).toBe(201);
  const served = (await admin.get(photo.body.photo.url).buffer(true)).body as Buffer;
  const made = await admin.post('/api/admin/backup');
  expect(made.status).toBe(201);
  return { admin, archive: path.join(h.dir, made.body.file), photoUrl: photo.body.photo.url as string, served };
}

it('a backup is one archive of the database and the photos; restored into an empty DATA_DIR it is a working shop', async () => {
  const { archive, photoUrl, served } = await backupWithPhoto();
  expect(archive).toMatch(/\.tar\.gz$/);
  expect(fs.statSync(archive).mode & 0o777).toBe(0o600);
  expect(fs.statSync(path.dirname(archive)).mode & 0o777).toBe(0o700);
  const entries: string[] = [];
  await tar.t({ file: archive, onReadEntry: (e) => void entries.push(e.path) });
  expect(entries).toEqual(expect.arrayContaining(['manifest.json', 'lumenbook.db', expect.stringMatching(/^photos\/[0-9a-f]{32}\.jpg$/)]));

  // Changed after the backup: the restore brings back the earlier state.
  h.database.db.update(users).set({ name: 'Changed after the backup' }).where(eq(users.email, 'tech@demo.test')).run();

  const target = emptyDir();
  const { replaced, photos } = await restoreBackup(archive, target);
  expect(replaced).toBeNull();
  expect(photos).toBe(1);
  const restored = await startHarness({ dataDir: target, seed: false });
  extra.push(restored);
  const admin = await restored.signIn('admin@demo.test');
  const me = await (await restored.signIn('tech@demo.test')).get('/api/auth/me');
  expect(me.body.user.name).not.toBe('Changed after the backup');
  const photo = await admin.get(photoUrl).buffer(true);
  expect(photo.status).toBe(200);
  expect(Buffer.compare(photo.body as Buffer, served)).toBe(0);
  expect((await admin.get('/api/coupons/1')).status).toBe(200);
});

it('refuses to restore while a server holds the database, and touches nothing', async () => {
  const { archive } = await backupWithPhoto();
  h.database.db.update(users).set({ name: 'Live change' }).where(eq(users.email, 'tech@demo.test')).run();
  await expect(restoreBackup(archive, h.dir)).rejects.toBeInstanceOf(DatabaseInUse);
  expect(fs.existsSync(path.join(h.dir, 'lumenbook.db.before-restore'))).toBe(false);
  expect(h.database.db.select().from(users).where(eq(users.email, 'tech@demo.test')).get()?.name).toBe('Live change');
});

it('keeps the replaced database with what was still in its WAL after an unclean stop', async () => {
  const { archive } = await backupWithPhoto();
  // A change that lives only in the WAL, then the files as a kill -9 would leave them.
  h.database.sqlite.pragma('wal_autocheckpoint = 0');
  h.database.db.update(users).set({ name: 'Only in the WAL' }).where(eq(users.email, 'tech@demo.test')).run();
  const crashed = emptyDir();
  for (const f of ['lumenbook.db', 'lumenbook.db-wal']) fs.copyFileSync(path.join(h.dir, f), path.join(crashed, f));
  // The main file alone does not have it: a plain file copy would lose it.
  const mainOnly = emptyDir();
  fs.copyFileSync(path.join(crashed, 'lumenbook.db'), path.join(mainOnly, 'lumenbook.db'));
  const plain = openDatabase(path.join(mainOnly, 'lumenbook.db'));
  expect(plain.db.select().from(users).where(eq(users.email, 'tech@demo.test')).get()?.name).not.toBe('Only in the WAL');
  plain.close();

  const { replaced } = await restoreBackup(archive, crashed);
  expect(replaced).toBe(path.join(crashed, 'lumenbook.db.before-restore'));
  const before = openDatabase(replaced!);
  try {
    expect(before.db.select().from(users).where(eq(users.email, 'tech@demo.test')).get()?.name).toBe('Only in the WAL');
  } finally {
    before.close();
  }
});

it('refuses a file that is not a Lumenbook backup, before touching anything', async () => {
  const target = emptyDir();
  const junk = path.join(target, 'junk.db');
  fs.writeFileSync(junk, 'not a database at all');
  await expect(restoreBackup(junk, target)).rejects.toThrow();
  const notOurs = path.join(target, 'other.tar.gz');
  fs.writeFileSync(path.join(target, 'readme.txt'), 'hello');
  await tar.c({ gzip: true, file: notOurs, cwd: target }, ['readme.txt']);
  await expect(restoreBackup(notOurs, target)).rejects.toThrow(/not a Lumenbook backup/);
  expect(fs.existsSync(path.join(target, 'lumenbook.db'))).toBe(false);
});
