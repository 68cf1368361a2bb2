import net from 'node:net';
import bcrypt from 'bcryptjs';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import nodemailer from 'nodemailer';
import { eq } from 'drizzle-orm';
import { startHarness, tokenFromMail, type Harness } from '../../testing/harness';
import { authTokens } from '../../db/schema/auth';
import { passwordSchema } from '../../../shared/schemas/common';

let h: Harness;
beforeEach(async () => {
  h = await startHarness();
});
afterEach(async () => {
  await h.close();
});

/** The cost factor of a bcrypt hash: `$2b$12$…` → 12. */
const costOf = (hash: string) => Number(hash.split('$')[2]);

describe('who has an account cannot be told by timing', () => {
  it('an unknown e-mail is checked against a hash of the same cost as a known one', async () => {
    const compare = vi.spyOn(bcrypt, 'compare');
    await h.agent().post('/api/auth/login').send({ email: 'tech@demo.test', password: 'not the password' });
    await h.agent().post('/api/auth/login').send({ email: 'nobody@demo.test', password: 'not the password' });
    const hashes = compare.mock.calls.map((c) => String(c[1]));
    compare.mockRestore();
    expect(hashes).toHaveLength(2);
    expect(costOf(hashes[1]!)).toBe(costOf(hashes[0]!));
  });

  it('a reset for a known e-mail answers without waiting for the mail server', async () => {
    // A mail server that accepts the connection and never says a word: the answer must not wait for it.
    const silent: net.Socket[] = [];
    const server = net.createServer((s) => void silent.push(s));
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    const port = (server.address() as net.AddressInfo).port;
    await h.close();
    h = await startHarness({ env: { SMTP_HOST: '127.0.0.1', SMTP_PORT: String(port) } });
    try {
      const known = await h.agent().post('/api/auth/password-reset').send({ email: 'tech@demo.test' });
      expect(known.status).toBe(202);
      const unknown = await h.agent().post('/api/auth/password-reset').send({ email: 'nobody@demo.test' });
      expect(unknown.status).toBe(202);
      expect(unknown.body).toEqual(known.body);
    } finally {
      for (const s of silent) s.destroy();
      server.close();
    }
  });
});

describe('sign-in limit per account and per address, kept in SQLite', () => {
  const wrong = (a: ReturnType<Harness['agent']>, email = 'tech@demo.test') => a.post('/api/auth/login').send({ email, password: 'wrong-wrong-wrong' });

  it('failures from one address hold the account shut for every other address too', async () => {
    await h.close();
    h = await startHarness({ loginLimit: 3, env: { TRUST_PROXY: 'loopback' } });
    for (let i = 0; i < 3; i++) expect((await wrong(h.agent().set('X-Forwarded-For', '203.0.113.7'))).status).toBe(401);
    const elsewhere = await h
      .agent()
      .set('X-Forwarded-For', '198.51.100.9')
      .post('/api/auth/login')
      .send({ email: 'tech@demo.test', password: 'lumenbook-demo' });
    expect(elsewhere.status).toBe(429);
    expect(elsewhere.body.error.code).toBe('rate_limited');
    // Another account from the first address is still open: the address has failures left.
    expect(
      (await h.agent().set('X-Forwarded-For', '203.0.113.7').post('/api/auth/login').send({ email: 'viewer@demo.test', password: 'lumenbook-demo' })).status,
    ).toBe(200);
  });

  it('correct sign-ins do not use up the allowance', async () => {
    await h.close();
    h = await startHarness({ loginLimit: 2 });
    for (let i = 0; i < 6; i++) {
      const res = await h
        .agent()
        .post('/api/auth/login')
        .send({ email: i % 2 ? 'tech@demo.test' : 'viewer@demo.test', password: 'lumenbook-demo' });
      expect(res.status).toBe(200);
    }
  });

  it('a forged X-Forwarded-For does not walk past the per-address limit when no proxy is configured', async () => {
    await h.close();
    h = await startHarness({ loginLimit: 2 });
    // Different accounts each time, so only the per-address count (2 × 3 = 6) can stop them.
    const emails = ['a', 'b', 'c', 'd', 'e', 'f'].map((x) => `${x}@demo.test`);
    for (const [i, email] of emails.entries()) {
      expect((await wrong(h.agent().set('X-Forwarded-For', `203.0.113.${i + 1}`), email)).status).toBe(401);
    }
    const seventh = await wrong(h.agent().set('X-Forwarded-For', '203.0.113.99'), 'g@demo.test');
    expect(seventh.status).toBe(429);
  });

  it('the count survives a restart', async () => {
    await h.close();
    h = await startHarness({ loginLimit: 2 });
    expect((await wrong(h.agent())).status).toBe(401);
    expect((await wrong(h.agent())).status).toBe(401);
    await h.restart();
    expect((await wrong(h.agent())).status).toBe(429);
  });

  it('TRUST_PROXY takes proxy addresses only, never "true" or a hop count', async () => {
    const { parseTrustProxy } = await import('../../env');
    expect(parseTrustProxy('')).toBe(false);
    expect(parseTrustProxy('127.0.0.1, 10.0.0.0/8, loopback')).toEqual(['127.0.0.1', '10.0.0.0/8', 'loopback']);
    expect(() => parseTrustProxy('true')).toThrow(/TRUST_PROXY/);
    expect(() => parseTrustProxy('1')).toThrow(/TRUST_PROXY/);
    expect(() => parseTrustProxy('10.0.0.0/99')).toThrow(/TRUST_PROXY/);
  });
});

describe('an https APP_URL reached over plain http', () => {
  it('refuses the sign-in and says why, instead of signing in without a cookie', async () => {
    await h.close();
    h = await startHarness({ env: { APP_URL: 'https://lumenbook.example', TRUST_PROXY: 'loopback' } });
    const plain = await h.agent().post('/api/auth/login').send({ email: 'tech@demo.test', password: 'lumenbook-demo' });
    expect(plain.status).toBe(403);
    expect(plain.body.error.message).toMatch(/plain http.*TRUST_PROXY/s);
    expect(plain.headers['set-cookie']).toBeUndefined();
    // Through the named proxy that terminated https, the Secure cookie is set.
    const proxied = await h.agent().set('X-Forwarded-Proto', 'https').post('/api/auth/login').send({ email: 'tech@demo.test', password: 'lumenbook-demo' });
    expect(proxied.status).toBe(200);
    expect(String(proxied.headers['set-cookie'])).toMatch(/lumenbook\.sid=.*Secure/);
  });
});

describe('invitations, passwords and the local mail server', () => {
  it('a disabled user cannot accept an invitation, and trying does not use up the link', async () => {
    const admin = await h.signIn('admin@demo.test');
    const inv = await admin.post('/api/users/invitations').send({ email: 'paused@demo.test', name: 'Paused Hand', role: 'technician' });
    const token = tokenFromMail(h.lastMail()?.textBody);
    expect((await admin.patch(`/api/users/${inv.body.user.id}`).send({ disabled: true })).status).toBe(200);
    const refused = await h.agent().post('/api/auth/invitations/accept').send({ token, password: 'paused hand password', name: 'Paused Hand' });
    expect(refused.status).toBe(401);
    expect(refused.body.error.message).toMatch(/disabled/);
    expect(h.database.db.select().from(authTokens).where(eq(authTokens.userId, inv.body.user.id)).get()?.usedAt).toBeNull();
    await admin.patch(`/api/users/${inv.body.user.id}`).send({ disabled: false });
    const accepted = await h.agent().post('/api/auth/invitations/accept').send({ token, password: 'paused hand password', name: 'Paused Hand' });
    expect(accepted.status).toBe(200);
  });

  it('refuses a new password over 72 bytes, which bcrypt would silently cut', async () => {
    await h.agent().post('/api/auth/password-reset').send({ email: 'tech@demo.test' });
    await h.mailer.settled();
    const token = tokenFromMail(h.lastMail()?.textBody);
    const long = 'a'.repeat(72) + 'tail that bcrypt would never see';
    const res = await h.agent().post('/api/auth/password-reset/confirm').send({ token, password: long });
    expect(res.status).toBe(400);
    expect(res.body.error.fieldErrors.password[0]).toMatch(/72 bytes/);
    // 24 three-byte letters are 72 bytes: allowed; one more is not.
    expect(passwordSchema.safeParse('€'.repeat(24)).success).toBe(true);
    expect(passwordSchema.safeParse('€'.repeat(25)).success).toBe(false);
    const ok = await h
      .agent()
      .post('/api/auth/password-reset/confirm')
      .send({ token, password: 'a'.repeat(72) });
    expect(ok.status).toBe(200);
  });

  it("the local SMTP server files the app's own mail only", async () => {
    const port = h.mailer.fakeSmtpPort!;
    const stranger = nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true });
    await expect(
      stranger.sendMail({ from: 'x@local.test', to: 'admin@demo.test', subject: 'Reset your Lumenbook password', text: 'token=forged-forged-forged-forged' }),
    ).rejects.toThrow();
    const guesser = nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true, auth: { user: 'lumenbook', pass: 'guess' } });
    await expect(guesser.sendMail({ from: 'x@local.test', to: 'admin@demo.test', subject: 'Hi', text: 'x' })).rejects.toThrow();
    stranger.close();
    guesser.close();
    expect(h.lastMail()).toBeUndefined();
    await h.agent().post('/api/auth/password-reset').send({ email: 'tech@demo.test' });
    await h.mailer.settled();
    expect(h.lastMail()?.toAddress).toBe('tech@demo.test');
  });
});
