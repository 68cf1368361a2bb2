import Database from 'better-sqlite3';
import { afterEach, describe, expect, it } from 'vitest';
import { SqliteSessionStore, TOUCH_SLACK_MS } from './session-store';

// The store alone, on a table shaped like the migration's: what a touch writes.
const open = () => {
  const sqlite = new Database(':memory:');
  sqlite.exec('CREATE TABLE sessions (sid TEXT PRIMARY KEY, sess TEXT NOT NULL, user_id INTEGER, expires_at INTEGER NOT NULL)');
  return { sqlite, store: new SqliteSessionStore(sqlite) };
};
const stored = (sqlite: Database.Database, sid: string) =>
  (sqlite.prepare('SELECT expires_at AS at FROM sessions WHERE sid = ?').get(sid) as { at: number }).at;
const withExpiry = (ms: number) => ({ cookie: { expires: new Date(ms), originalMaxAge: null } }) as never;

describe('session store touch', () => {
  let close = () => {};
  afterEach(() => close());

  it('moves the stored expiry only when it is more than the slack behind, so reads do not write', () => {
    const { sqlite, store } = open();
    close = () => {
      store.close();
      sqlite.close();
    };
    const t0 = Date.UTC(2026, 0, 1);
    store.set('a', withExpiry(t0));
    const before = sqlite.prepare('SELECT total_changes() AS n').get() as { n: number };
    store.touch('a', withExpiry(t0 + TOUCH_SLACK_MS - 1000));
    expect(stored(sqlite, 'a')).toBe(t0);
    expect((sqlite.prepare('SELECT total_changes() AS n').get() as { n: number }).n).toBe(before.n);
    store.touch('a', withExpiry(t0 + TOUCH_SLACK_MS + 1000));
    expect(stored(sqlite, 'a')).toBe(t0 + TOUCH_SLACK_MS + 1000);
  });
});
