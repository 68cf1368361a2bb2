import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startHarness, type Harness } from '../testing/harness';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => {
  await h.close();
});

const PROTOTYPE_KEYS = ['constructor', 'toString', '__proto__', 'valueOf', 'hasOwnProperty'];

describe('keys named like Object.prototype members', () => {
  it('answer 400 with the envelope on sign-in, not 500', async () => {
    for (const key of PROTOTYPE_KEYS) {
      const res = await h
        .agent()
        .post('/api/auth/login')
        .set('Content-Type', 'application/json')
        .send(`{"email":"tech@demo.test","password":"lumenbook-demo","${key}":1}`);
      expect(res.status, key).toBe(400);
      expect(res.body.error.fieldErrors[key], key).toEqual(['Unknown field']);
    }
  });

  it('never answer 500 on any route, in the body or the query', async () => {
    const admin = await h.signIn('admin@demo.test');
    const failures: string[] = [];
    for (const d of h.lumenbook.declaredRoutes) {
      if (d.path === '/api/auth/logout') continue;
      const url = d.path.replace(/:(\w+)/g, '1');
      for (const key of PROTOTYPE_KEYS) {
        const method = d.method.toLowerCase() as 'post';
        let req = admin[method](`${url}?${key}=1`);
        if (d.method !== 'GET') req = req.set('Content-Type', 'application/json').send(`{"${key}":1}`);
        const res = await req;
        if (res.status >= 500 || (!res.body?.error && res.status >= 400)) failures.push(`${d.method} ${url} ${key} → ${res.status}`);
      }
    }
    expect(failures).toEqual([]);
  });
});

describe('Origin headers', () => {
  it('Origin: null and a malformed Origin are refused with 403, not 500', async () => {
    for (const origin of ['null', 'not a url', 'http://', '://x']) {
      const res = await h.agent().post('/api/auth/login').set('Origin', origin).send({ email: 'tech@demo.test', password: 'lumenbook-demo' });
      expect(res.status, origin).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
  });
});

describe('PATCH /api/auth/me', () => {
  it('an empty body is a 400 that says there is nothing to change', async () => {
    const a = await h.signIn('viewer@demo.test');
    const res = await a.patch('/api/auth/me').send({});
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
  });
});

describe('malformed multipart uploads', () => {
  const raw = (body: string, contentType: string) => async () => {
    const a = await h.signIn('tech@demo.test');
    return a.post('/api/coupons/1/photos').set('Content-Type', contentType).send(Buffer.from(body, 'latin1'));
  };
  const cases: [string, () => Promise<request.Response>][] = [
    ['missing boundary', raw('--x\r\nContent-Disposition: form-data; name="kind"\r\n\r\ngeneral\r\n--x--\r\n', 'multipart/form-data')],
    [
      'truncated body',
      raw(
        '--xyz\r\nContent-Disposition: form-data; name="file"; filename="a.png"\r\nContent-Type: image/png\r\n\r\n\x89PNG',
        'multipart/form-data; boundary=xyz',
      ),
    ],
    [
      'NUL in the field name',
      raw('--xyz\r\nContent-Disposition: form-data; name="ki\x00nd"\r\n\r\ngeneral\r\n--xyz--\r\n', 'multipart/form-data; boundary=xyz'),
    ],
    ['malformed part header', raw('--xyz\r\nContent-Disposition form-data name\r\n\r\ngeneral\r\n--xyz--\r\n', 'multipart/form-data; boundary=xyz')],
  ];
  it('NUL in the file name → a 4xx with the envelope', async () => {
    const res = await raw(
      '--xyz\r\nContent-Disposition: form-data; name="file"; filename="a\x00.png"\r\nContent-Type: image/png\r\n\r\nnot an image\r\n--xyz--\r\n',
      'multipart/form-data; boundary=xyz',
    )();
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(res.status).toBeLessThan(500);
    expect(res.body.error.fieldErrors.file).toBeTruthy();
  });

  for (const [name, send] of cases) {
    it(`${name} → 400 with the envelope`, async () => {
      const res = await send();
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
    });
  }
});
