import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from '../../testing/harness';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => {
  await h.close();
});

describe('the address printed labels use', () => {
  it('defaults from APP_URL and says a phone cannot open a loopback address', async () => {
    const viewer = await h.signIn('viewer@demo.test');
    const res = await viewer.get('/api/settings');
    expect(res.status).toBe(200);
    expect(res.body.settings.labelBaseUrl).toBeNull();
    expect(res.body.labelAddress).toMatchObject({ url: h.config.appUrl, source: 'app-url', loopback: true });
    expect(res.body.labelAddress.warning).toMatch(/phone/);
  });

  it('an admin sets the address the shop phones use; the trial label sheet then uses it; emptying it goes back to APP_URL', async () => {
    const admin = await h.signIn('admin@demo.test');
    const set = await admin.patch('/api/settings').send({ labelBaseUrl: 'http://192.168.1.20:3000/' });
    expect(set.status).toBe(200);
    expect(set.body.labelAddress).toEqual({ url: 'http://192.168.1.20:3000', source: 'setting', loopback: false, warning: null });

    let trialId = 0;
    let sheet = { address: { url: '' }, labels: [] as { url: string; couponId: number }[] };
    for (const t of (await admin.get('/api/trials')).body.items as { id: number }[]) {
      sheet = (await admin.get(`/api/trials/${t.id}/labels`)).body;
      trialId = t.id;
      if (sheet.labels.length > 0) break;
    }
    expect(sheet.address.url).toBe('http://192.168.1.20:3000');
    expect(sheet.labels.length).toBeGreaterThan(0);
    for (const l of sheet.labels) expect(l.url).toBe(`http://192.168.1.20:3000/coupons/${l.couponId}`);

    const cleared = await admin.patch('/api/settings').send({ labelBaseUrl: null });
    expect(cleared.status).toBe(200);
    expect(cleared.body.labelAddress).toMatchObject({ url: h.config.appUrl, source: 'app-url' });
    expect((await admin.get(`/api/trials/${trialId}/labels`)).body.address.loopback).toBe(true);
  });

  it('refuses an address that is not http(s), naming the field; only the admin may set it', async () => {
    const admin = await h.signIn('admin@demo.test');
    for (const bad of ['ftp://shop-pc/', 'shop-pc:3000', 'http://shop-pc:3000/?x=1']) {
      const res = await admin.patch('/api/settings').send({ labelBaseUrl: bad });
      expect(res.status, bad).toBe(400);
      expect(Object.keys(res.body.error.fieldErrors)).toEqual(['labelBaseUrl']);
    }
    const tech = await h.signIn('tech@demo.test');
    expect((await tech.patch('/api/settings').send({ labelBaseUrl: 'http://shop-pc:3000' })).status).toBe(403);
  });
});
