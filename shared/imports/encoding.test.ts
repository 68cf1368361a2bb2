import { describe, expect, it } from 'vitest';
import { binaryReason, detectEncoding, isValidUtf8 } from './encoding';

const bytes = (...b: number[]) => new Uint8Array(b);
const utf8 = (s: string) => new TextEncoder().encode(s);

describe('encoding detection', () => {
  it('honours byte-order marks (The Unicode Standard §23.8)', () => {
    expect(detectEncoding(bytes(0xef, 0xbb, 0xbf, 0x61))).toMatchObject({ encoding: 'utf-8', bomBytes: 3 });
    expect(detectEncoding(bytes(0xff, 0xfe, 0x61, 0x00))).toMatchObject({ encoding: 'utf-16le', bomBytes: 2 });
    expect(detectEncoding(bytes(0xfe, 0xff, 0x00, 0x61))).toMatchObject({ encoding: 'utf-16be', bomBytes: 2 });
  });

  it('tells UTF-8 from Windows-1252 without a mark', () => {
    expect(detectEncoding(utf8('tag;mass\nA-1;12,3 g\n'))).toMatchObject({ encoding: 'utf-8', bomBytes: 0 });
    expect(detectEncoding(utf8('Probe;Masse\nÄ-1;12,3 g\n'))).toMatchObject({ encoding: 'utf-8' });
    // "Ä" in Windows-1252 is the single byte C4, which is not valid UTF-8 before an ASCII byte.
    expect(detectEncoding(bytes(0xc4, 0x2d, 0x31))).toMatchObject({ encoding: 'windows-1252' });
  });

  it('accepts a UTF-8 sequence cut at the end of a sample', () => {
    const e = utf8('ab€');
    expect(isValidUtf8(e.subarray(0, e.length - 1))).toBe(true);
    expect(isValidUtf8(bytes(0xe2, 0x41, 0x41))).toBe(false);
  });

  it('names binary files', () => {
    expect(binaryReason(bytes(0x50, 0x4b, 0x03, 0x04, 1, 2), 'utf-8')).toMatch(/ZIP/);
    expect(binaryReason(bytes(0x25, 0x50, 0x44, 0x46), 'utf-8')).toMatch(/PDF/);
    expect(binaryReason(bytes(0x61, 0x00, 0x62), 'utf-8')).toMatch(/zero bytes/);
    expect(binaryReason(bytes(0x61, 0x00, 0x62, 0x00), 'utf-16le')).toBeNull();
    expect(binaryReason(utf8('a,b\r\n1,2\r\n'), 'utf-8')).toBeNull();
  });
});
