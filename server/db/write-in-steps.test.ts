import fs from 'node:fs';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from '../testing/harness';
import { checkpointsSettled } from './checkpoint-apart';
import { species } from './schema/reference';
import { writeInSteps } from './write-in-steps';

describe('writeInSteps: one transaction on a second connection, the event loop free between steps', () => {
  let h: Harness;
  let tech: Awaited<ReturnType<Harness['signIn']>>;
  beforeAll(async () => {
    h = await startHarness();
    tech = await h.signIn('tech@demo.test');
  });
  afterAll(async () => {
    await h.close();
  });

  const count = () => (h.database.sqlite.prepare("select count(*) as n from audit_log where action = 'step-test'").get() as { n: number }).n;
  const insert = "insert into audit_log (action, entity, entity_id) values ('step-test', 'test', '1')";

  it('answers reads and health between steps, tells writes to try again, and commits everything at the end', async () => {
    const sp = h.database.db.select().from(species).limit(1).get()!;
    let released = false;
    let turns = 0;
    const progress: number[] = [];
    const written = writeInSteps(
      h.database.sqlite,
      function* (db) {
        db.run(sql.raw(insert));
        // Holds the transaction open, a turn of the event loop at a time, until the test has been answered.
        while (!released) {
          turns++;
          yield 0.5;
        }
        db.run(sql.raw(insert));
        return 'done';
      },
      (f) => progress.push(f),
    );
    expect((await tech.get('/api/health')).status).toBe(200);
    expect((await tech.get('/api/coupons?pageSize=1')).status).toBe(200);
    const write = await tech.post('/api/coupons').send({ tag: 'STEP-1', speciesId: sp.id, role: 'treated' });
    expect(write.status).toBe(503);
    // Readers see the data before the transaction until it commits.
    expect(count()).toBe(0);
    released = true;
    expect(await written).toBe('done');
    expect(turns).toBeGreaterThan(1);
    expect(progress.every((f) => f === 0.5)).toBe(true);
    expect(count()).toBe(2);
    expect((await tech.post('/api/coupons').send({ tag: 'STEP-1', speciesId: sp.id, role: 'treated' })).status).toBe(201);
  });

  it('rolls everything back on an error in a later step, and lets recover answer instead', async () => {
    const before = count();
    await expect(
      writeInSteps(h.database.sqlite, function* (db) {
        db.run(sql.raw(insert));
        yield 0.5;
        throw new Error('late failure');
      }),
    ).rejects.toThrow('late failure');
    expect(count()).toBe(before);
    const recovered = await writeInSteps(
      h.database.sqlite,
      function* (db): Generator<number, string, void> {
        db.run(sql.raw(insert));
        yield 0.5;
        throw new Error('late failure');
      },
      () => {},
      (db, err) => {
        // The same connection, after the rollback: what the failure means is written on its own.
        db.run(sql.raw(insert));
        return { value: (err as Error).message };
      },
    );
    expect(recovered).toBe('late failure');
    expect(count()).toBe(before + 1);
  });

  it("copies a long write's log into the database file in another thread after the commit, not at COMMIT nor at the app's next write", async () => {
    const file = h.database.sqlite.name;
    h.database.sqlite.pragma('wal_checkpoint(TRUNCATE)');
    const size = () => fs.statSync(file).size;
    const before = size();
    // About 4 MB of new pages, past SQLite's automatic checkpoint (1,000 pages), written a slice per step.
    await writeInSteps(h.database.sqlite, function* (db) {
      for (let i = 0; i < 40; i++) {
        db.run(
          sql.raw(
            `with recursive n(i) as (select 1 union all select i + 1 from n where i < 50)
             insert into audit_log (action, entity, entity_id, reason) select 'step-test', 'test', '1', printf('%.2000c', 'x') from n`,
          ),
        );
        yield i / 40;
      }
      return null;
    });
    // At COMMIT the rows are in the log only (a thread takes tens of ms to start, and this line runs at once
    // after the commit); the thread then copies them into the file.
    expect(size()).toBeLessThan(before + 1_000_000);
    // Nor does the app's connection copy them at its next write (SQLite's automatic checkpoint would, on this
    // thread: the log is past 1,000 pages). Written at once, with no await before it: the thread, running
    // beside this one, must not have had the time to copy them first.
    expect(h.database.sqlite.pragma('wal_autocheckpoint', { simple: true })).toBe(0);
    h.database.sqlite.exec(insert);
    expect(size()).toBeLessThan(before + 1_000_000);
    // The health probe, also a write, answers meanwhile.
    expect((await tech.get('/api/health')).status).toBe(200);
    // checkpointsSettled waits for that thread: whoever removes a data folder awaits it first (harness.close).
    await checkpointsSettled();
    expect(size()).toBeGreaterThan(before + 3_000_000);
    expect(h.database.sqlite.pragma('wal_autocheckpoint', { simple: true })).toBe(1_000);
    expect(count()).toBeGreaterThanOrEqual(2_000);
  });
});
