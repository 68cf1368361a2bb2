import { describe, expect, it } from 'vitest';
import { parseNumber } from './parse-number';

describe('parseNumber', () => {
  it.each([
    ['', null],
    ['   ', null],
    ['12.5', 12.5],
    ['12,5', 12.5],
    [' 12,50 ', 12.5],
    ['-0,25', -0.25],
    ['+3', 3],
    ['.5', 0.5],
    [',5', 0.5],
    ['7.', 7],
    ['1 234,5', 1234.5],
    ['1\u00a0234.5', 1234.5],
    ["1'234.5", 1234.5],
    ['1,234.5', 1234.5],
    ['1.234,5', 1234.5],
    ['1,234,567', 1234567],
    ['1.234.567', 1234567],
    ['1,234', 1.234],
    ['1.2e-3', 0.0012],
    ['2E3', 2000],
  ])('%j → %j', (text, value) => {
    expect(parseNumber(text)).toBe(value);
  });

  it.each(['abc', '12..5', '1,2,3', '1.2.3', '1,23.4', '1.234,5,6', '12,5.3,1', 'Infinity', '0x10', '1e', '--1', '12 g'])('%j is not a number', (text) => {
    expect(parseNumber(text)).toBeNaN();
  });

  it('passes numbers through and treats nothing as not given', () => {
    expect(parseNumber(3.5)).toBe(3.5);
    expect(parseNumber(Number.POSITIVE_INFINITY)).toBeNaN();
    expect(parseNumber(null)).toBeNull();
    expect(parseNumber(undefined)).toBeNull();
  });
});
