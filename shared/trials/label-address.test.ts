import { describe, expect, it } from 'vitest';
import { isLoopbackHost, labelAddress } from './label-address';

describe('loopback host names (RFC 6761 §6.3 for localhost; RFC 1122 §3.2.1.3 for 127/8; RFC 4291 §2.5.3 for ::1)', () => {
  const rows: [string, boolean][] = [
    ['localhost', true],
    ['LOCALHOST', true],
    ['lumen.localhost', true],
    ['127.0.0.1', true],
    ['127.1.2.3', true],
    ['[::1]', true],
    ['::1', true],
    ['0.0.0.0', true],
    ['[::ffff:7f00:1]', true],
    ['192.168.1.20', false],
    ['10.0.0.5', false],
    ['shop-pc.local', false],
    ['notlocalhost', false],
    ['lumenbook.example', false],
    ['128.0.0.1', false],
  ];
  it.each(rows)('%s → %s', (host, loopback) => {
    expect(isLoopbackHost(host)).toBe(loopback);
  });
});

describe('the address labels use', () => {
  it('defaults from APP_URL and warns when it is this computer only', () => {
    const a = labelAddress(null, 'http://localhost:3000/');
    expect(a).toMatchObject({ url: 'http://localhost:3000', source: 'app-url', loopback: true });
    expect(a.warning).toContain('a phone that scans a label cannot open it');
  });

  it('takes the shop setting over APP_URL, without a trailing slash', () => {
    expect(labelAddress('http://192.168.1.20:3000/', 'http://localhost:3000')).toEqual({
      url: 'http://192.168.1.20:3000',
      source: 'setting',
      loopback: false,
      warning: null,
    });
    expect(labelAddress('  ', 'https://lumenbook.example').source).toBe('app-url');
  });

  it('an IPv6 loopback setting is caught too', () => {
    expect(labelAddress('http://[::1]:3000', 'https://lumenbook.example').loopback).toBe(true);
  });
});
