import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from '../testing/harness';

let h: Harness;
beforeEach(async () => {
  h = await startHarness();
});
afterEach(async () => {
  await h.close();
});

// Faults are made with SQLite's own switches, so the errors are the real ones: `query_only` refuses
// every write as a read-only file does (SQLITE_READONLY), `max_page_count` makes the database full
// (SQLITE_FULL) as a full disk does.
const pageCount = (h: Harness) => Number(h.database.sqlite.pragma('page_count', { simple: true }));

describe('health', () => {
  it('answers ok while the database can be written', async () => {
    const res = await h.agent().get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ ok: true, database: 'writable' });
  });

  it('reports a database that cannot be written', async () => {
    h.database.sqlite.pragma('query_only = ON');
    const res = await h.agent().get('/api/health');
    expect(res.status).toBe(503);
    expect(res.body).toEqual({ ok: false, database: 'read-only' });
    h.database.sqlite.pragma('query_only = OFF');
  });
});

describe('writes on a full or read-only store', () => {
  it('a full database answers 507 with a plain message, not a 500', async () => {
    h.database.sqlite.pragma(`max_page_count = ${pageCount(h)}`);
    // Each sign-in writes a session row; soon one needs a page the database may not grow.
    let res;
    for (let i = 0; i < 400; i++) {
      res = await h.agent().post('/api/auth/login').send({ email: 'tech@demo.test', password: 'lumenbook-demo' });
      if (res.status !== 200) break;
    }
    expect(res?.status).toBe(507);
    expect(res?.body.error.code).toBe('storage_full');
    expect(res?.body.error.message).toMatch(/disk .* is full/);
  });

  it('a read-only database answers 503 naming the cause', async () => {
    const tech = await h.signIn('tech@demo.test');
    h.database.sqlite.pragma('query_only = ON');
    const res = await tech.patch('/api/auth/me').send({ unitSystem: 'us' });
    h.database.sqlite.pragma('query_only = OFF');
    expect(res.status).toBe(503);
    expect(res.body.error.code).toBe('storage_unavailable');
  });
});
