import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, expect, it } from 'vitest';
import { openDatabase } from './db/client';
import { DEMO_USERS, isEmpty } from './seed';
import { seedFreshDemoApart } from './demo-seed';

const dirs: string[] = [];
const freshDir = () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-demo-seed-'));
  dirs.push(dir);
  return dir;
};
afterAll(() => dirs.forEach((d) => fs.rmSync(d, { recursive: true, force: true })));

it('writes the demo into a database that does not exist yet, in a worker thread, and lets go of the file', async () => {
  const file = path.join(freshDir(), 'lumenbook.db');
  expect(await seedFreshDemoApart(file)).toBe(true);
  // The thread closed its connection and the process lock: this process can open the database now.
  const database = openDatabase(file);
  try {
    expect(isEmpty(database)).toBe(false);
    const emails = database.sqlite.prepare('select email from users order by id').pluck().all();
    expect(emails).toEqual(DEMO_USERS.map((u) => u.email));
    // The demo finding's plot was drawn in the thread.
    expect(database.sqlite.prepare("select count(*) from finding_evidence where svg like '<svg%'").pluck().get()).toBeGreaterThan(0);
  } finally {
    database.close();
  }
}, 120_000);

it('leaves an existing database to the caller', async () => {
  const file = path.join(freshDir(), 'lumenbook.db');
  openDatabase(file).close();
  expect(await seedFreshDemoApart(file)).toBe(false);
  const database = openDatabase(file);
  try {
    expect(isEmpty(database)).toBe(true);
  } finally {
    database.close();
  }
}, 60_000);
