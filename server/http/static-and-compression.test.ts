import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHarness, type Harness } from '../testing/harness';

// In production the built client is served with caching that suits its file names (content-hashed
// assets: a year, immutable; the page itself: revalidated), source maps are never served, and answers
// are compressed when the browser accepts it.

let h: Harness;
let clientDir: string;
const ASSET = 'index-3f9a1c2b.js';

beforeAll(async () => {
  clientDir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-client-'));
  fs.mkdirSync(path.join(clientDir, 'assets'));
  fs.writeFileSync(path.join(clientDir, 'index.html'), '<!doctype html><title>Lumenbook</title><div id="root"></div>');
  fs.writeFileSync(path.join(clientDir, 'assets', ASSET), `export const words = ${JSON.stringify('stabilized wood '.repeat(400))};\n`);
  fs.writeFileSync(path.join(clientDir, 'assets', `${ASSET}.map`), '{"version":3,"sources":["src/main.tsx"],"mappings":""}');
  h = await startHarness({ env: { NODE_ENV: 'production' }, clientDir });
});
afterAll(async () => {
  await h.close();
  fs.rmSync(clientDir, { recursive: true, force: true });
});

describe('the built client in production', () => {
  it('caches hashed assets for a year, immutable', async () => {
    const res = await h.agent().get(`/assets/${ASSET}`);
    expect(res.status).toBe(200);
    expect(res.headers['cache-control']).toMatch(/max-age=31536000/);
    expect(res.headers['cache-control']).toMatch(/immutable/);
  });

  it('revalidates the page itself, at / and at any client path', async () => {
    for (const url of ['/', '/trials/3']) {
      const res = await h.agent().get(url);
      expect(res.status).toBe(200);
      expect(res.text).toContain('<div id="root">');
      expect(res.headers['cache-control']).toBe('no-cache');
    }
  });

  it('never serves a source map, and a missing asset is a 404, not the page', async () => {
    expect((await h.agent().get(`/assets/${ASSET}.map`)).status).toBe(404);
    expect((await h.agent().get('/assets/gone-00000000.js')).status).toBe(404);
  });

  it('compresses JSON answers and assets for a browser that accepts gzip', async () => {
    const viewer = await h.signIn('viewer@demo.test');
    const list = await viewer.get('/api/species?pageSize=200').set('accept-encoding', 'gzip');
    expect(list.status).toBe(200);
    expect(list.headers['content-encoding']).toBe('gzip');
    expect(list.body.items.length).toBeGreaterThan(0);
    const asset = await h.agent().get(`/assets/${ASSET}`).set('accept-encoding', 'gzip');
    expect(asset.headers['content-encoding']).toBe('gzip');
  });

  it('sends a remembered list answer gzipped or plain as asked, with an ETag that answers 304 when nothing changed', async () => {
    const viewer = await h.signIn('viewer@demo.test');
    const zipped = await viewer.get('/api/coupons?pageSize=50').set('accept-encoding', 'gzip');
    expect(zipped.status).toBe(200);
    expect(zipped.headers['content-encoding']).toBe('gzip');
    expect(zipped.headers.vary).toMatch(/Accept-Encoding/i);
    const plain = await viewer.get('/api/coupons?pageSize=50').set('accept-encoding', 'identity');
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.body).toEqual(zipped.body);
    expect(plain.headers.etag).toBe(zipped.headers.etag);
    const again = await viewer.get('/api/coupons?pageSize=50').set('if-none-match', zipped.headers.etag as string);
    expect(again.status).toBe(304);
  });
});
