import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import { drizzle } from 'drizzle-orm/better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { applyMigrations, openDatabase, openSqlite, schema } from './client';

let dir: string;
beforeEach(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-storage-'));
});
afterEach(() => {
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('first start on a full disk', () => {
  it('says the disk is full instead of "cannot rollback"', () => {
    const sqlite = openSqlite(path.join(dir, 'lumenbook.db'));
    // SQLite's own page limit gives the real SQLITE_FULL that a full disk gives.
    sqlite.pragma('max_page_count = 4');
    try {
      expect(() => applyMigrations(drizzle(sqlite, { schema }), sqlite)).toThrow(/disk holding .* is full/);
    } finally {
      sqlite.close();
    }
  });
});

describe("files and folders are the owner's only", () => {
  it('creates the data folder 0700 and the database 0600', () => {
    const dataDir = path.join(dir, 'data');
    const database = openDatabase(path.join(dataDir, 'lumenbook.db'));
    try {
      expect(fs.statSync(dataDir).mode & 0o777).toBe(0o700);
      expect(fs.statSync(path.join(dataDir, 'lumenbook.db')).mode & 0o777).toBe(0o600);
      database.db.run('CREATE TABLE probe (x)');
      const wal = path.join(dataDir, 'lumenbook.db-wal');
      if (fs.existsSync(wal)) expect(fs.statSync(wal).mode & 0o777).toBe(0o600);
    } finally {
      database.close();
    }
  });
});

describe('one process per database', () => {
  it('a second opener of the same file, in this process or another, is refused while the first holds its lock', () => {
    const file = path.join(dir, 'lumenbook.db');
    const first = openDatabase(file);
    try {
      expect(() => openDatabase(file)).toThrow(/Another Lumenbook process is using/);
      const script = `const D=require('better-sqlite3');const d=new D(${JSON.stringify(file)},{timeout:0});try{d.prepare('SELECT 1 FROM users').get();console.log('read')}catch(e){console.log(e.code)}`;
      const other = spawnSync(process.execPath, ['-e', script], { encoding: 'utf8', cwd: process.cwd() });
      // The lock is the process lock file's, not the database's (a worker thread writes imports on a
      // second connection): a plain SQLite reader in another process may read, as WAL allows.
      expect(other.stdout.trim()).toBe('read');
      const lockHolder = `const D=require('better-sqlite3');const d=new D(${JSON.stringify(`${file}-lock`)},{timeout:0});try{d.exec('BEGIN EXCLUSIVE');console.log('locked')}catch(e){console.log(e.code)}`;
      expect(spawnSync(process.execPath, ['-e', lockHolder], { encoding: 'utf8', cwd: process.cwd() }).stdout.trim()).toBe('SQLITE_BUSY');
    } finally {
      first.close();
    }
    // Once closed, the next opener gets it.
    openDatabase(file).close();
  });
});

describe('DATA_DIR is checked at start', () => {
  it('a data folder that cannot be created or written is named plainly', async () => {
    const { prepareDataDir } = await import('./data-dir');
    const file = path.join(dir, 'a-file');
    fs.writeFileSync(file, 'x');
    expect(() => prepareDataDir(path.join(file, 'data'))).toThrow(/DATA_DIR .* cannot be written: part of the path is a file/);
    prepareDataDir(path.join(dir, 'fresh'));
    expect(fs.statSync(path.join(dir, 'fresh')).mode & 0o777).toBe(0o700);
    expect(fs.readdirSync(path.join(dir, 'fresh'))).toEqual([]);
  });

  it.skipIf(process.getuid?.() === 0)('a read-only data folder is refused (skipped as root, who may write anywhere)', async () => {
    const { prepareDataDir } = await import('./data-dir');
    const ro = path.join(dir, 'ro');
    fs.mkdirSync(ro, { mode: 0o500 });
    expect(() => prepareDataDir(ro)).toThrow(/DATA_DIR .* cannot be written: this user may not write there/);
  });
});
