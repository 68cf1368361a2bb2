import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, describe, expect, it } from 'vitest';
import { ANALYSIS_SOURCE_TABLES, Lru, createDataVersion, keyOf } from './analysis.cache';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-analysis-cache-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

/** A file with a table of each source name (their columns do not matter to the version). */
function open(file: string) {
  const db = new Database(file);
  for (const t of ANALYSIS_SOURCE_TABLES)
    db.exec(
      `create table if not exists ${t} (${t === 'coupon_results' ? 'coupon_id integer primary key, role text, trial_id integer, species_id integer' : 'id integer primary key'}, v real${t === 'run_stages' ? ', run_id integer' : ''})`,
    );
  return db;
}

describe('the data version an analysis answer is cached under', () => {
  it('changes with every insert, update and delete on a source table through this connection', () => {
    const db = open(path.join(dir, 'one.db'));
    const version = createDataVersion(db);
    const v0 = version();
    expect(version()).toBe(v0);
    db.prepare('insert into coupon_results (coupon_id, v) values (1, 10)').run();
    const v1 = version();
    expect(v1).not.toBe(v0);
    db.prepare('update coupon_results set v = 11 where coupon_id = 1').run();
    const v2 = version();
    expect(v2).not.toBe(v1);
    db.prepare('insert into run_stages (id, v) values (1, 1)').run();
    const v3 = version();
    expect(v3).not.toBe(v2);
    db.prepare('delete from species').run(); // no row: nothing changed, nothing counted
    expect(version()).toBe(v3);
    db.close();
  });

  it('takes a rolled-back write back, and leaves writes to other tables out', () => {
    const db = open(path.join(dir, 'two.db'));
    db.exec('create table sessions (sid text primary key)');
    const version = createDataVersion(db);
    const v0 = version();
    expect(() =>
      db.transaction(() => {
        db.prepare('insert into coupon_results (v) values (1)').run();
        throw new Error('refused');
      })(),
    ).toThrow('refused');
    expect(version()).toBe(v0);
    db.prepare("insert into sessions values ('a')").run();
    expect(version()).toBe(v0);
    db.close();
  });

  it('changes when another connection writes, and when the schema changes (triggers put back)', () => {
    const file = path.join(dir, 'three.db');
    const reader = open(file);
    const version = createDataVersion(reader);
    const v0 = version();
    const writer = new Database(file);
    writer.prepare('insert into coupon_results (v) values (2)').run();
    const v1 = version();
    expect(v1).not.toBe(v0);
    writer.close();
    // A migration that rebuilds a table drops its triggers; the next version check puts them back.
    reader.exec(
      'drop table coupon_results; create table coupon_results (coupon_id integer primary key, role text, trial_id integer, species_id integer, v real)',
    );
    const v2 = version();
    expect(v2).not.toBe(v1);
    reader.prepare('insert into coupon_results (v) values (3)').run();
    expect(version()).not.toBe(v2);
    reader.close();
  });
});

describe('the coupons written since a version', () => {
  it('names the results rows and runs written through this connection, and gives up when it cannot tell', () => {
    const file = path.join(dir, 'four.db');
    const db = open(file);
    const version = createDataVersion(db);
    db.prepare('insert into coupon_results (coupon_id, v) values (1, 1), (2, 2), (3, 3)').run();
    const v0 = version();
    expect(version.changedSince(v0, 10)).toEqual({ couponIds: [], runIds: [], controlPairs: [], names: false });
    db.prepare('update coupon_results set v = 20 where coupon_id = 2').run();
    db.prepare('delete from coupon_results where coupon_id = 3').run();
    db.prepare('insert into coupon_results (coupon_id, v) values (4, 4)').run();
    db.prepare('insert into run_stages (id, v, run_id) values (1, 1, 7)').run();
    const changed = version.changedSince(v0, 10);
    expect(new Set(changed?.couponIds)).toEqual(new Set([2, 3, 4]));
    expect(changed?.runIds).toEqual([7]); // a run's stage: its coupons are read again
    expect(version.changedSince(v0, 2)).toBeNull(); // more than the limit
    const v1 = version();
    version.prune(1);
    expect(version()).toBe(v1); // pruning keeps the generation
    expect(version.changedSince(v0, 10)).toBeNull(); // the rows after v0 are gone: cannot tell
    expect(version.changedSince(v1, 10)).toEqual({ couponIds: [], runIds: [], controlPairs: [], names: false });
    db.prepare("update coupon_results set role = 'control', trial_id = 5, species_id = 9 where coupon_id = 1").run();
    expect(version.changedSince(v1, 10)?.controlPairs).toEqual([{ trialId: 5, speciesId: 9 }]); // whatever filters a reader has
    db.prepare("update coupon_results set role = 'treated', trial_id = 6 where coupon_id = 1").run();
    // It stopped being a control: its former trial's treated coupons lose it as their reference.
    expect(version.changedSince(v1, 10)?.controlPairs).toEqual([{ trialId: 5, speciesId: 9 }]);
    const vBefore = version();
    db.prepare('insert into resins (id, v) values (1, 1)').run(); // a reference table: names may change, no coupon row did
    expect(version.changedSince(vBefore, 10)).toEqual({ couponIds: [], runIds: [], controlPairs: [], names: true });
    const v2 = version();
    const writer = new Database(file);
    writer.prepare('update coupon_results set v = 5 where coupon_id = 1').run();
    writer.close();
    expect(version.changedSince(v2, 10)).toBeNull(); // another connection: the log cannot see it
    db.close();
  });
});

describe('cache helpers', () => {
  it('keys plain data regardless of key order and of undefined fields', () => {
    expect(keyOf({ a: 1, b: [2, 3], c: undefined })).toBe(keyOf({ b: [2, 3], a: 1 }));
    expect(keyOf({ a: [1, 2] })).not.toBe(keyOf({ a: [2, 1] }));
  });

  it('drops the least recently used entry', () => {
    const lru = new Lru<number>(2);
    lru.set('a', 1);
    lru.set('b', 2);
    expect(lru.get('a')).toBe(1);
    lru.set('c', 3);
    expect(lru.get('b')).toBeUndefined();
    expect(lru.get('a')).toBe(1);
    expect(lru.size).toBe(2);
  });
});
