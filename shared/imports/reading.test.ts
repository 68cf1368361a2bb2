import { describe, expect, it } from 'vitest';
import { parseDecimal, parseReading, parseReadingGeneral, readStabilityFlag, type DecimalMark } from './reading';

describe('parseReading', () => {
  it.each([
    ['+   12.345 g', '.', 12.345, 'g', null],
    ['0.4520 oz', '.', 0.452, 'oz', null],
    ['12,345 g', ',', 12.345, 'g', null],
    ['-   0.002 g', '.', -0.002, 'g', null],
    ['  12.345', '.', 12.345, null, null],
    ['12.345g', '.', 12.345, 'g', null],
    ['ST,+0012.345 g', '.', 12.345, 'g', true],
    ['US,+0012.346 g', '.', 12.346, 'g', false],
    ['S S      12.345 g', '.', 12.345, 'g', true],
    ['S D      12.349 g', '.', 12.349, 'g', false],
    ['12.345 g ?', '.', 12.345, 'g', false],
    ['12.345 g?', '.', 12.345, 'g', false],
    ['12.345 g ST', '.', 12.345, 'g', true],
    ['? 12.345 g', '.', 12.345, 'g', false],
    ['1,234.5 g', '.', 1234.5, 'g', null],
    ['1.234,5 g', ',', 1234.5, 'g', null],
    ['0,0452 kg', ',', 0.0452, 'kg', null],
    ['3.5 ct', '.', 3.5, 'ct', null],
    ['7.25 dwt', '.', 7.25, 'dwt', null],
    ['+12.3\u00a0g', '.', 12.3, 'g', null],
  ] as const)('%j (decimal %s) → %s %s stable=%s', (text, decimal, value, unit, stable) => {
    const r = parseReading(text, decimal);
    expect(r).toEqual({ ok: true, value, unit, stable });
  });

  it.each([
    ['', 'empty'],
    ['   ', 'empty'],
    ['abc', 'not-a-number'],
    ['12.3.4 g', 'not-a-number'],
    ['12.5 mg', 'unknown-unit'],
    ['12.5 stone', 'unknown-unit'],
    ['OL', 'overload'],
    ['-OL-', 'overload'],
    ['ST, OL', 'not-a-number'],
    ['=HYPERLINK("x")', 'not-a-number'],
  ] as const)('%j is refused as %s', (text, reason) => {
    const r = parseReading(text);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toBe(reason);
  });

  it('hints at a decimal comma when a comma reading meets a decimal-point file', () => {
    const r = parseReading('12,34 g', '.');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(/decimal commas/);
  });

  it('reads flags standing alone', () => {
    expect(readStabilityFlag('ST')).toBe(true);
    expect(readStabilityFlag(' us ')).toBe(false);
    expect(readStabilityFlag('?')).toBe(false);
    expect(readStabilityFlag('yes')).toBe(true);
    expect(readStabilityFlag('12.3')).toBeNull();
  });

  it('accepts thousands separators only in groups of three', () => {
    expect(parseDecimal('12,34', '.')).toBeNull();
    expect(parseDecimal("1'234.5", '.')).toBe(1234.5);
    expect(parseDecimal('1 234,5', ',')).toBe(1234.5);
    expect(parseDecimal('.5', '.')).toBe(0.5);
    expect(parseDecimal(',5', ',')).toBe(0.5);
  });
});

describe('parseReading fast path', () => {
  // The fast path reads plain numbers straight from their characters; every answer must be the general path's.
  // prettier-ignore
  const tricky = [
    '12.345', '0', '-0', '+0', '007', '12.', '.5', ',5', '5,', '-12.345', '+12.345', '--1', '+-1', '-', '+', '', ' ', '1.2.3',
    '1,2,3', '12,345', '1,234.5', '1.234,5', '1 234', "1'234", '12.345 ', ' 12.345', '12.345g', '12.345 g', '1e5', '0x10',
    '12.345 g', '+   12.345 g', '- 0.5 kg', '12.345g', '12.345  G', '0,452oz', '12.345 g ', '12.345 gr', '12.345 st', '12.345 us', '12.345 g.',
    '12.345 constructor', '12.345 lbs', '12 ounces', '12.345 \u00a0g', '+ ', '- g', '12.345 ST', 'Infinity', 'NaN', '١٢', '１２', '12\u00a0', '9'.repeat(400), `${'9'.repeat(400)}.5`, '0.000000000000000000001',
    '123456789012345678901234567890', 'E1', 'OL', '-OL-', '12.345?', '12,345 g', '- 5', '+ 5', '5-', '5+', '.', ',', '-.5', '-,5',
  ];
  it.each(['.', ','] as const)('gives the general answer on tricky inputs (decimal %s)', (decimal) => {
    for (const text of tricky) expect(parseReading(text, decimal), text).toEqual(parseReadingGeneral(text, decimal));
  });

  it('gives the general answer on random strings of digits, signs, marks and spaces', () => {
    // A fixed linear congruential sequence (Numerical Recipes' constants): the same strings on every run.
    let seed = 12345;
    const next = () => (seed = (seed * 1664525 + 1013904223) >>> 0) / 2 ** 32;
    const alphabet = '0123456789012345678901234567.,+-   gGkoOzlbsStTuUdDw?é';
    for (let k = 0; k < 40_000; k++) {
      const len = 1 + Math.floor(next() * 12);
      let text = '';
      for (let i = 0; i < len; i++) text += alphabet[Math.floor(next() * alphabet.length)];
      const decimal: DecimalMark = next() < 0.5 ? '.' : ',';
      expect(parseReading(text, decimal), JSON.stringify(text)).toEqual(parseReadingGeneral(text, decimal));
    }
  });
});
