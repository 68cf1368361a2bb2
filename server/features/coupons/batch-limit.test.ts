import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from '../../testing/harness';
import { species } from '../../db/schema/reference';

// The grid's batch save accepts what its contract allows: 500 entries of full rows in one request
// (the JSON limit of other routes, 100 kB, would refuse a quarter of that).

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => {
  await h.close();
});

describe('the batch save of the entry grid', () => {
  it('accepts 500 full rows in one request and writes them all', async () => {
    const tech = await h.signIn('tech@demo.test');
    const speciesId = h.database.db.select().from(species).all()[0]!.id;
    // 500 coupons straight into the table: the API is not what this test is about.
    const insert = h.database.sqlite.prepare("insert into coupons (tag, species_id, role) values (?, ?, 'treated')");
    const ids = h.database.sqlite.transaction(() => Array.from({ length: 500 }, (_, i) => Number(insert.run(`BL-${i}`, speciesId).lastInsertRowid)))();
    const at = (h2: number) => new Date(Date.now() - h2 * 3_600_000).toISOString();
    const entries = ids.map((couponId, i) => ({
      couponId,
      weighings: [
        { stage: 'drying-check', massG: 31 + (i % 7) / 10, measuredAt: at(30) },
        { stage: 'drying-check', massG: 31 + (i % 7) / 10, measuredAt: at(26) },
        { stage: 'dry', massG: 31 + (i % 7) / 10, measuredAt: at(25) },
      ],
      checks: [
        { kind: 'dimension', stage: 'dry', measuredAt: at(25), lengthMm: 100, widthMm: 25.4, thicknessMm: 12.7, method: 'digital caliper' },
        { kind: 'moisture', stage: 'dry', measuredAt: at(25), moisturePct: 7.5, method: 'pin meter' },
        { kind: 'hardness', stage: 'dry', measuredAt: at(25), hardnessValue: 62, hardnessScale: 'shore-d', method: 'durometer' },
      ],
    }));
    const body = JSON.stringify({ entries });
    expect(body.length).toBeGreaterThan(250_000);
    const res = await tech.post('/api/coupons/measurements').set('content-type', 'application/json').send(body);
    expect(res.status, JSON.stringify(res.body).slice(0, 500)).toBe(201);
    const n = h.database.sqlite
      .prepare("select count(*) as n from weighings where stage = 'dry' and coupon_id in (select id from coupons where tag like 'BL-%')")
      .get() as {
      n: number;
    };
    expect(n.n).toBe(500);
  }, 120_000);

  it('still refuses an oversized body on other routes', async () => {
    const tech = await h.signIn('tech@demo.test');
    const res = await tech.post('/api/coupons').send({ tag: 'BL-X', speciesId: 1, role: 'treated', notes: 'x'.repeat(150_000) });
    expect(res.status).toBe(413);
  });
});
