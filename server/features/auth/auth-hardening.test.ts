import net from 'node:net';
import bcrypt from 'bcryptjs';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { startHarness, type Harness } from '../../testing/harness';

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
