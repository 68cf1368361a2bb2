import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runs } from '../db/schema/runs';
import { startHarness, type Harness } from '../testing/harness';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => {
  await h.close();
});

describe('a DomainError that reaches the one error middleware', () => {
  it('answers 422 naming its field, not 500, through a real route', async () => {
    // A run stored at 20 km (written past the contract, as an old row or a hand edit could be): the run page
    // works out the standard atmosphere there, which the domain refuses above the troposphere (11 km).
    const run = h.database.db.insert(runs).values({ code: 'DOMAIN-1', chamber: 'Test chamber', altitudeM: 20_000 }).returning().get();
    const viewer = await h.signIn('viewer@demo.test');
    const res = await viewer.get(`/api/runs/${run.id}`);
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('unprocessable');
    expect(res.body.error.fieldErrors.altitudeM[0]).toMatch(/troposphere/);
    expect(res.body.error.requestId).toBeTruthy();
  });
});
