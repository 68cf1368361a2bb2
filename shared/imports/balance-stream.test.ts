import { describe, expect, it } from 'vitest';
import { GRAMS_PER_OUNCE } from '../units';
import { LineSplitter, MAX_BALANCE_LINE, readBalanceLine } from './balance-stream';

const G = { decimal: '.', unitWhenNone: 'g' } as const;

describe('LineSplitter: a serial stream into lines', () => {
  it('ends lines at CR, LF and CR LF, and joins a line split across chunks', () => {
    const s = new LineSplitter();
    expect(s.push('ST,+0012.3')).toEqual([]);
    expect(s.push('45 g\r\n  12.0 g\n')).toEqual(['ST,+0012.345 g', '  12.0 g']);
    expect(s.push('7.5 g\r8.5 g\r')).toEqual(['7.5 g', '8.5 g']);
  });

  it('counts a CR at the end of one chunk and an LF at the start of the next as one line end', () => {
    const s = new LineSplitter();
    expect(s.push('12.345 g\r')).toEqual(['12.345 g']);
    expect(s.push('\n13.000 g\r\n')).toEqual(['13.000 g']);
  });

  it('drops a run-on line whole and goes on with the next', () => {
    const s = new LineSplitter();
    expect(s.push('x'.repeat(MAX_BALANCE_LINE + 50))).toEqual([]);
    expect(s.push('\r\n5.000 g\r\n')).toEqual(['5.000 g']);
    expect(s.overlong).toBe(1);
  });
});

describe('readBalanceLine: what a line from the balance means', () => {
  it('takes a settled reading, in grams, with the unit printed or the balance’s own', () => {
    expect(readBalanceLine('ST,+0012.345 g', G)).toEqual({ kind: 'mass', grams: 12.345, printed: 'ST,+0012.345 g' });
    expect(readBalanceLine('   12.345', G)).toMatchObject({ kind: 'mass', grams: 12.345 });
    // 1 oz (avoirdupois) = 28.349 523 125 g exactly (NIST SP 811 App. B).
    const oz = readBalanceLine('0.5000 oz', G);
    expect(oz.kind === 'mass' && oz.grams).toBeCloseTo(0.5 * GRAMS_PER_OUNCE, 12);
    expect(readBalanceLine('12,345 g', { decimal: ',', unitWhenNone: 'g' })).toMatchObject({ kind: 'mass', grams: 12.345 });
  });

  it('never takes a reading the balance marks as still settling', () => {
    expect(readBalanceLine('US,+0012.301 g', G)).toEqual({ kind: 'unstable', printed: 'US,+0012.301 g' });
    expect(readBalanceLine('12.301 g ?', G)).toMatchObject({ kind: 'unstable' });
  });

  it('refuses zero, a negative mass, an overload and chatter, each with the reason', () => {
    expect(readBalanceLine('0.000 g', G)).toMatchObject({ kind: 'refused', why: expect.stringMatching(/nothing on the pan/) });
    expect(readBalanceLine('-3.210 g', G)).toMatchObject({ kind: 'refused', why: expect.stringMatching(/tare/) });
    expect(readBalanceLine('OL', G)).toMatchObject({ kind: 'refused', why: expect.stringMatching(/over or under its range/) });
    expect(readBalanceLine('ID 0042 Tare', G)).toMatchObject({ kind: 'refused', why: expect.stringMatching(/not a number/) });
    expect(readBalanceLine('  ', G)).toEqual({ kind: 'blank' });
  });
});
