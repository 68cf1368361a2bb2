import { describe, expect, it } from 'vitest';
import { canonicalJson, differences } from './canonical';

describe('canonical JSON for signatures', () => {
  it('sorts keys by UTF-16 code units, recursively, without whitespace (RFC 8785 §3.2.3 sorting example, from memory)', () => {
    // The RFC's example object has these keys; its canonical form lists them in this order.
    const keys = ['\u20ac', '\r', '\ufb33', '1', '\ud83d\ude00', '\u0080', '\u00f6'];
    const obj = Object.fromEntries(keys.map((k, i) => [k, i]));
    expect(canonicalJson(obj)).toBe('{"\\r":1,"1":3,"\u0080":5,"\u00f6":6,"\u20ac":0,"\ud83d\ude00":4,"\ufb33":2}');
    expect(canonicalJson({ b: { d: 1, c: [true, null] }, a: 'x' })).toBe('{"a":"x","b":{"c":[true,null],"d":1}}');
  });

  it('writes numbers the ECMAScript way (RFC 8785 §3.2.2.3) and refuses non-finite ones', () => {
    expect(canonicalJson([1e21, 1e-7, 0.1, -0, 100, 333333333.3333333])).toBe('[1e+21,1e-7,0.1,0,100,333333333.3333333]');
    expect(() => canonicalJson({ x: Number.NaN })).toThrow(/non-finite number at \$\.x/);
    expect(() => canonicalJson({ x: Infinity })).toThrow();
  });

  it('makes NFC and NFD spellings and CRLF/LF line endings hash alike', () => {
    expect(canonicalJson({ t: 'Caf\u00e9\r\nline' })).toBe(canonicalJson({ t: 'Cafe\u0301\nline' }));
    expect(canonicalJson({ t: 'a' })).not.toBe(canonicalJson({ t: 'b' }));
  });

  it('drops undefined keys, keeps nulls and array order', () => {
    expect(canonicalJson({ a: undefined, b: null, c: [2, 1] })).toBe('{"b":null,"c":[2,1]}');
  });

  it('names the paths where two values differ', () => {
    const a = { title: 'T', evidence: [{ snapshot: { n: 1 } }, { snapshot: { n: 2 } }], tags: ['x'] };
    const b = { title: 'T', evidence: [{ snapshot: { n: 1 } }, { snapshot: { n: 3 } }], tags: ['x', 'y'] };
    expect(differences(a, b)).toEqual(['evidence[1].snapshot.n', 'tags']);
    expect(differences(a, structuredClone(a))).toEqual([]);
  });
});
