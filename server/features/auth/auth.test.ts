import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { eq } from 'drizzle-orm';
import { startHarness, tokenFromMail, type Harness } from '../../testing/harness';
import { users, sessions } from '../../db/schema/auth';
import { auditLog } from '../../db/schema/admin';
import { CSRF_HEADER } from '../../../shared/constants/errors';

let h: Harness;
beforeEach(async () => {
  h = await startHarness();
});
afterEach(async () => {
  await h.close();
});

describe('sign-in', () => {
  it('signs in with the right password and answers the user', async () => {
    const res = await h.agent().post('/api/auth/login').send({ email: 'tech@demo.test', password: 'lumenbook-demo' });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ email: 'tech@demo.test', role: 'technician', disabled: false });
    expect(res.body.user.passwordHash).toBeUndefined();
    const cookie = String(res.headers['set-cookie']);
    expect(cookie).toMatch(/lumenbook\.sid=/);
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);
  });

  it('gives the same answer for a wrong password and an unknown user', async () => {
    const wrong = await h.agent().post('/api/auth/login').send({ email: 'tech@demo.test', password: 'not the password' });
    const unknown = await h.agent().post('/api/auth/login').send({ email: 'nobody@demo.test', password: 'not the password' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body.error.message).toBe(unknown.body.error.message);
    expect(wrong.body.error.code).toBe('unauthenticated');
    expect(wrong.body.error.requestId).toBeTruthy();
  });

  it('rate-limits repeated sign-in attempts', async () => {
    await h.close();
    h = await startHarness({ loginLimit: 3 });
    const a = h.agent();
    for (let i = 0; i < 3; i++) {
      const r = await a.post('/api/auth/login').send({ email: 'tech@demo.test', password: 'wrong-wrong-wrong' });
      expect(r.status).toBe(401);
    }
    const limited = await a.post('/api/auth/login').send({ email: 'tech@demo.test', password: 'lumenbook-demo' });
    expect(limited.status).toBe(429);
    expect(limited.body.error.code).toBe('rate_limited');
  });

  it('regenerates the session id at sign-in', async () => {
    const a = h.agent();
    const first = await a.post('/api/auth/login').send({ email: 'tech@demo.test', password: 'lumenbook-demo' });
    const second = await a.post('/api/auth/login').send({ email: 'tech@demo.test', password: 'lumenbook-demo' });
    const sid = (r: request.Response) => String(r.headers['set-cookie']).match(/lumenbook\.sid=([^;]+)/)?.[1];
    expect(sid(first)).toBeTruthy();
    expect(sid(second)).not.toBe(sid(first));
  });

  it('answers 401 on /me without a session', async () => {
    const res = await request(h.lumenbook.app).get('/api/auth/me');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it('keeps the session across a server restart', async () => {
    const a = await h.signIn('reviewer@demo.test');
    const login = await h.agent().post('/api/auth/login').send({ email: 'reviewer@demo.test', password: 'lumenbook-demo' });
    const cookie = String(login.headers['set-cookie']).split(';')[0]!;
    expect((await a.get('/api/auth/me')).status).toBe(200);
    await h.restart();
    const me = await request(h.lumenbook.app).get('/api/auth/me').set('Cookie', cookie);
    expect(me.status).toBe(200);
    expect(me.body.user.email).toBe('reviewer@demo.test');
  });

  it('signs out', async () => {
    const a = await h.signIn('viewer@demo.test');
    expect((await a.post('/api/auth/logout')).status).toBe(204);
    expect((await a.get('/api/auth/me')).status).toBe(401);
  });

  it('refuses a write without the CSRF header, even when signed in', async () => {
    const bare = request.agent(h.lumenbook.app);
    expect((await bare.post('/api/auth/login').set(CSRF_HEADER, '1').send({ email: 'admin@demo.test', password: 'lumenbook-demo' })).status).toBe(200);
    const res = await bare.patch('/api/auth/me').send({ unitSystem: 'us' });
    expect(res.status).toBe(403);
    expect(res.body.error.message).toContain(CSRF_HEADER);
    expect((await bare.get('/api/auth/me')).body.user.unitSystem).toBe('metric');
  });

  it('stores a display-unit preference per user', async () => {
    const a = await h.signIn('tech@demo.test');
    const res = await a.patch('/api/auth/me').send({ unitSystem: 'us' });
    expect(res.status).toBe(200);
    expect(res.body.user.unitSystem).toBe('us');
    expect((await a.get('/api/auth/me')).body.user.unitSystem).toBe('us');
  });

  it('keeps a unit per quantity: a preset, then single choices on top, and a preset again starts afresh', async () => {
    const a = await h.signIn('tech@demo.test');
    const me = (await a.get('/api/auth/me')).body.user;
    expect(me.units).toMatchObject({ mass: 'g', length: 'mm', temperature: 'degC', pressure: 'kPa', density: 'kgPerM3', altitude: 'm', force: 'N' });

    // A US shop with a gram scale: US preset, mass in g, density in g/cm³.
    const mixed = await a.patch('/api/auth/me').send({ unitSystem: 'us', units: { mass: 'g', density: 'gPerCm3' } });
    expect(mixed.status).toBe(200);
    expect(mixed.body.user.units).toEqual({
      mass: 'g',
      length: 'in',
      temperature: 'degF',
      pressure: 'inHg',
      volume: 'in3',
      liquidVolume: 'gal',
      density: 'gPerCm3',
      altitude: 'ft',
      force: 'lbf',
    });
    // A later single choice keeps the earlier ones.
    const one = await a.patch('/api/auth/me').send({ units: { pressure: 'kPa' } });
    expect(one.body.user.units).toMatchObject({ mass: 'g', density: 'gPerCm3', pressure: 'kPa', length: 'in' });
    const row = h.database.db.select().from(users).where(eq(users.email, 'tech@demo.test')).get()!;
    expect(row.unitOverrides).toEqual({ mass: 'g', density: 'gPerCm3', pressure: 'kPa' });

    const reset = await a.patch('/api/auth/me').send({ unitSystem: 'metric' });
    expect(reset.body.user.units).toMatchObject({ mass: 'g', length: 'mm', pressure: 'kPa', density: 'kgPerM3' });
    expect(h.database.db.select().from(users).where(eq(users.email, 'tech@demo.test')).get()!.unitOverrides).toBeNull();
  });

  it('refuses a unit that is not one of its quantity, naming the field', async () => {
    const a = await h.signIn('tech@demo.test');
    const res = await a.patch('/api/auth/me').send({ units: { mass: 'in' } });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fieldErrors)).toEqual(['units.mass']);
  });
});

describe('password reset', () => {
  it('mails a one-time link that sets a new password and cannot be used twice or after expiry', async () => {
    const ask = await h.agent().post('/api/auth/password-reset').send({ email: 'tech@demo.test' });
    expect(ask.status).toBe(202);
    await h.mailer.settled();
    const mail = h.lastMail();
    expect(mail?.toAddress).toBe('tech@demo.test');
    const token = tokenFromMail(mail?.textBody);

    const ok = await h.agent().post('/api/auth/password-reset/confirm').send({ token, password: 'a brand new password' });
    expect(ok.status).toBe(200);
    expect((await h.agent().post('/api/auth/login').send({ email: 'tech@demo.test', password: 'a brand new password' })).status).toBe(200);
    expect((await h.agent().post('/api/auth/login').send({ email: 'tech@demo.test', password: 'lumenbook-demo' })).status).toBe(401);

    const again = await h.agent().post('/api/auth/password-reset/confirm').send({ token, password: 'another new password' });
    expect(again.status).toBe(400);
    expect(again.body.error.fieldErrors.token).toBeTruthy();

    await h.agent().post('/api/auth/password-reset').send({ email: 'tech@demo.test' });
    await h.mailer.settled();
    const late = tokenFromMail(h.lastMail()?.textBody);
    h.clock.offsetMs = 2 * 3600_000;
    const expired = await h.agent().post('/api/auth/password-reset/confirm').send({ token: late, password: 'too late password' });
    expect(expired.status).toBe(400);
  });

  it('answers 202 for an unknown e-mail and sends nothing', async () => {
    const res = await h.agent().post('/api/auth/password-reset').send({ email: 'nobody@demo.test' });
    expect(res.status).toBe(202);
    await h.mailer.settled();
    expect(h.lastMail()).toBeUndefined();
  });

  it('refuses a short new password with the field named', async () => {
    const res = await h
      .agent()
      .post('/api/auth/password-reset/confirm')
      .send({ token: 'x'.repeat(40), password: 'short' });
    expect(res.status).toBe(400);
    expect(res.body.error.fieldErrors.password[0]).toMatch(/12 characters/);
  });
});

describe('invitations and users (admin)', () => {
  it('invites by e-mail; the link sets a password once and expires', async () => {
    const admin = await h.signIn('admin@demo.test');
    const inv = await admin.post('/api/users/invitations').send({ email: 'New.Hand@demo.test', name: 'New Hand', role: 'technician' });
    expect(inv.status).toBe(201);
    expect(inv.body.user).toMatchObject({ email: 'new.hand@demo.test', invitationPending: true });
    const mail = h.lastMail();
    expect(mail?.toAddress).toBe('new.hand@demo.test');
    expect(mail?.subject).toMatch(/invited/);
    const token = tokenFromMail(mail?.textBody);

    // The page shows whom the link invites, so the name the admin typed is prefilled.
    const preview = await h.agent().get(`/api/auth/invitations/${token}`);
    expect(preview.status).toBe(200);
    expect(preview.body.invitation).toMatchObject({ email: 'new.hand@demo.test', name: 'New Hand', role: 'technician' });

    const accepted = await h.agent().post('/api/auth/invitations/accept').send({ token, password: 'new hand password', name: 'New Hand' });
    expect(accepted.status).toBe(200);
    expect(accepted.body.user.role).toBe('technician');
    expect((await h.agent().post('/api/auth/login').send({ email: 'new.hand@demo.test', password: 'new hand password' })).status).toBe(200);

    const twice = await h.agent().post('/api/auth/invitations/accept').send({ token, password: 'another password!', name: 'X' });
    expect(twice.status).toBe(400);
    expect((await h.agent().get(`/api/auth/invitations/${token}`)).status).toBe(404);

    await admin.post('/api/users/invitations').send({ email: 'late@demo.test', name: 'Late', role: 'viewer' });
    const lateToken = tokenFromMail(h.lastMail()?.textBody);
    h.clock.offsetMs = 73 * 3600_000;
    const expired = await h.agent().post('/api/auth/invitations/accept').send({ token: lateToken, password: 'late password 123', name: 'Late' });
    expect(expired.status).toBe(400);
    expect((await h.agent().get(`/api/auth/invitations/${lateToken}`)).status).toBe(404);
    expect((await h.agent().get('/api/auth/invitations/not*a*token')).status).toBe(400);
  });

  it('refuses to invite an existing user', async () => {
    const admin = await h.signIn('admin@demo.test');
    const res = await admin.post('/api/users/invitations').send({ email: 'tech@demo.test', name: 'Again', role: 'viewer' });
    expect(res.status).toBe(409);
    expect(res.body.error.fieldErrors.email).toBeTruthy();
  });

  it('changes a role and audits it', async () => {
    const admin = await h.signIn('admin@demo.test');
    const viewer = h.database.db.select().from(users).where(eq(users.email, 'viewer@demo.test')).get()!;
    const res = await admin.patch(`/api/users/${viewer.id}`).send({ role: 'technician' });
    expect(res.status).toBe(200);
    expect(res.body.user.role).toBe('technician');
    const audit = h.database.db
      .select()
      .from(auditLog)
      .where(eq(auditLog.entityId, String(viewer.id)))
      .all();
    expect(audit.at(-1)).toMatchObject({ action: 'update', entity: 'user', before: { role: 'viewer' } });
  });

  it("a disabled user's session stops working and they cannot sign in", async () => {
    const tech = await h.signIn('tech@demo.test');
    const admin = await h.signIn('admin@demo.test');
    const row = h.database.db.select().from(users).where(eq(users.email, 'tech@demo.test')).get()!;
    expect((await admin.patch(`/api/users/${row.id}`).send({ disabled: true })).status).toBe(200);
    expect(h.database.db.select().from(sessions).where(eq(sessions.userId, row.id)).all()).toHaveLength(0);
    expect((await tech.get('/api/auth/me')).status).toBe(401);
    expect((await h.agent().post('/api/auth/login').send({ email: 'tech@demo.test', password: 'lumenbook-demo' })).status).toBe(401);
  });

  it('does not let the admin disable themself', async () => {
    const admin = await h.signIn('admin@demo.test');
    const me = (await admin.get('/api/auth/me')).body.user;
    const res = await admin.patch(`/api/users/${me.id}`).send({ disabled: true });
    expect(res.status).toBe(409);
  });

  it('lists users with pagination', async () => {
    const admin = await h.signIn('admin@demo.test');
    const res = await admin.get('/api/users?page=1&pageSize=2&sort=email');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ page: 1, pageSize: 2, total: 4 });
    expect(res.body.items.map((u: { email: string }) => u.email)).toEqual(['admin@demo.test', 'reviewer@demo.test']);
  });

  it.each(['reviewer@demo.test', 'tech@demo.test', 'viewer@demo.test'])('denies %s on admin routes', async (email) => {
    const a = await h.signIn(email);
    expect((await a.get('/api/users')).status).toBe(403);
    expect((await a.post('/api/users/invitations').send({ email: 'x@demo.test', name: 'X', role: 'admin' })).status).toBe(403);
    expect((await a.patch('/api/users/1').send({ role: 'viewer' })).status).toBe(403);
    expect((await a.get('/api/admin/outbox')).status).toBe(403);
    expect((await a.post('/api/admin/backup')).status).toBe(403);
  });
});

describe('CSRF header variants', () => {
  it('accepts X-Requested-With: XMLHttpRequest in place of the Lumenbook header', async () => {
    const res = await request(h.lumenbook.app)
      .post('/api/auth/login')
      .set('X-Requested-With', 'XMLHttpRequest')
      .send({ email: 'tech@demo.test', password: 'lumenbook-demo' });
    expect(res.status).toBe(200);
  });

  it('refuses a write whose Origin is another site', async () => {
    const res = await h
      .agent()
      .post('/api/auth/login')
      .set('Origin', 'https://elsewhere.example')
      .send({ email: 'tech@demo.test', password: 'lumenbook-demo' });
    expect(res.status).toBe(403);
  });
});
