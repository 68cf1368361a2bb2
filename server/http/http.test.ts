import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import express from 'express';
import request from 'supertest';
import { ROLES } from '../../shared/constants/roles';
import { startHarness, type Harness } from '../testing/harness';
import { ACCESS_TAG } from './routes';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => {
  await h.close();
});

interface Layer {
  route?: { path: string; methods: Record<string, boolean>; stack: { handle: object }[] };
  handle: { stack?: Layer[] } & object;
}

/** Every route layer mounted anywhere in the app, found by walking Express's own router stacks. */
function mountedRoutes(app: express.Express) {
  const found: { path: string; methods: string[]; rule: unknown }[] = [];
  const walk = (stack: Layer[]) => {
    for (const layer of stack) {
      if (layer.route) {
        const first = layer.route.stack[0]?.handle as Record<symbol, unknown> | undefined;
        found.push({ path: layer.route.path, methods: Object.keys(layer.route.methods), rule: first?.[ACCESS_TAG] });
      } else if (layer.handle.stack) {
        walk(layer.handle.stack);
      }
    }
  };
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack);
  return found;
}

describe('access rules', () => {
  it('every mounted API route declares an access rule as its first handler (deny by default)', () => {
    const routes = mountedRoutes(h.lumenbook.app).filter((r) => r.path !== '/{*splat}');
    expect(routes.length).toBeGreaterThan(10);
    const missing = routes.filter((r) => r.rule !== 'public' && !ROLES.includes(r.rule as never));
    expect(missing).toEqual([]);
  });

  it('the walker catches a route added without a rule', () => {
    const app = express();
    const r = express.Router();
    r.get('/sneaky', (_req, res) => res.json({}));
    app.use('/api', r);
    expect(
      mountedRoutes(app)
        .filter((x) => x.rule === undefined)
        .map((x) => x.path),
    ).toEqual(['/sneaky']);
  });

  it('public routes are exactly the sign-in, reset, invitation and health routes', () => {
    const publicRoutes = h.lumenbook.declaredRoutes.filter((d) => d.access === 'public').map((d) => `${d.method} ${d.path}`);
    expect(publicRoutes.sort()).toEqual(
      [
        'GET /api/health',
        'POST /api/auth/login',
        'POST /api/auth/logout',
        'POST /api/auth/password-reset',
        'POST /api/auth/password-reset/confirm',
        'POST /api/auth/invitations/accept',
        'GET /api/auth/invitations/:token',
      ].sort(),
    );
  });

  it('every non-public route answers 401 without a session', async () => {
    const app = h.lumenbook.app;
    for (const d of h.lumenbook.declaredRoutes.filter((x) => x.access !== 'public')) {
      const url = d.path.replace(/:(\w+)/g, '1');
      const res = await request(app)[d.method.toLowerCase() as 'get'](url).set('x-lumenbook-csrf', '1').send({});
      expect(res.status, `${d.method} ${d.path}`).toBe(401);
    }
  });
});

describe('bad input gets the error envelope with the field named', () => {
  it('GET /api/health', async () => {
    const res = await request(h.lumenbook.app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ ok: true, database: 'writable' });
    expect(res.headers['x-request-id']).toBeTruthy();
  });

  it('malformed JSON', async () => {
    const res = await h.agent().post('/api/auth/login').set('Content-Type', 'application/json').send('{"email": ');
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'validation_failed', message: 'The request body is not valid JSON' });
    expect(res.headers['content-type']).toMatch(/json/);
  });

  it('wrong types', async () => {
    const res = await h.agent().post('/api/auth/login').send({ email: 42, password: true });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fieldErrors).sort()).toEqual(['email', 'password']);
  });

  it('unknown fields', async () => {
    const res = await h.agent().post('/api/auth/password-reset').send({ email: 'a@demo.test', admin: true });
    expect(res.status).toBe(400);
    expect(res.body.error.fieldErrors.admin).toEqual(['Unknown field']);
  });

  it('over-long strings', async () => {
    const res = await h
      .agent()
      .post('/api/auth/login')
      .send({ email: 'a@demo.test', password: 'x'.repeat(500) });
    expect(res.status).toBe(400);
    expect(res.body.error.fieldErrors.password).toBeTruthy();
  });

  it('oversized bodies', async () => {
    const res = await h
      .agent()
      .post('/api/auth/login')
      .send({ email: 'a@demo.test', password: 'x'.repeat(200_000) });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
  });

  it('bad query values name the parameter', async () => {
    const admin = await h.signIn('admin@demo.test');
    const res = await admin.get('/api/users?page=0&pageSize=many');
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fieldErrors).sort()).toEqual(['page', 'pageSize']);
  });

  it('unknown API paths answer JSON 404, not HTML', async () => {
    const res = await request(h.lumenbook.app).get('/api/nothing-here');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('never leaks a stack trace or the cause of a real failure', async () => {
    // A real internal error (a table the route reads is gone), in an app of its own so the other tests keep theirs.
    const broken = await startHarness();
    try {
      const viewer = await broken.signIn('viewer@demo.test');
      broken.database.sqlite.exec('ALTER TABLE species RENAME TO species_gone');
      const res = await viewer.get('/api/species');
      expect(res.status).toBe(500);
      expect(res.body.error).toEqual({ code: 'internal', message: expect.any(String), requestId: expect.any(String) });
      expect(JSON.stringify(res.body)).not.toMatch(/species_gone|no such table|Sqlite|\.ts:\d+|node_modules|\bat \w/i);
    } finally {
      await broken.close();
    }
  });
});

describe('admin', () => {
  it('reads the outbox and makes an online backup', async () => {
    const admin = await h.signIn('admin@demo.test');
    await h.agent().post('/api/auth/password-reset').send({ email: 'viewer@demo.test' });
    await h.mailer.settled();
    const out = await admin.get('/api/admin/outbox');
    expect(out.status).toBe(200);
    expect(out.body.items[0]).toMatchObject({ to: 'viewer@demo.test' });
    const backup = await admin.post('/api/admin/backup');
    expect(backup.status).toBe(201);
    expect(backup.body.bytes).toBeGreaterThan(0);
  });

  it('everyone reads the shop settings; only the admin changes them', async () => {
    const viewer = await h.signIn('viewer@demo.test');
    expect((await viewer.get('/api/settings')).body.settings.altitudeM).toBe(1600);
    expect((await viewer.patch('/api/settings').send({ altitudeM: 10 })).status).toBe(403);
    const admin = await h.signIn('admin@demo.test');
    const bad = await admin.patch('/api/settings').send({ altitudeM: 9000 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fieldErrors.altitudeM).toBeTruthy();
    const ok = await admin.patch('/api/settings').send({ altitudeM: 1200 });
    expect(ok.body.settings.altitudeM).toBe(1200);
  });
});
