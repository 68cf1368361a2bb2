import { describe, expect, it } from 'vitest';
import { parseDecimal, parseReading, readStabilityFlag } from './reading';

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
