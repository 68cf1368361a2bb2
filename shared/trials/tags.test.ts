import { describe, expect, it } from 'vitest';
import { assignCodes, controlTag, parseTag, resinCode, speciesCode, treatedTag, trialCode, trialCounter } from './tags';

describe('coupon tag scheme', () => {
  it.each([
    ['Maple, red', 'RMA'],
    ['Buckeye, yellow', 'YBU'],
    ['Birch, yellow', 'YBI'],
    ['Box elder', 'BEL'],
    ['Sweetgum', 'SWE'],
    ['Yellow-poplar', 'YPO'],
    ['Box elder burl, spalted', 'SBEBU'],
  ])('species code of %s is %s', (name, code) => {
    expect(speciesCode(name)).toBe(code);
  });

  it.each([
    ['Crystal Pane 90', 'CP90'],
    ['Ember Pane 90 (dyed)', 'EPD90'],
    ['Glassmere', 'GLA'],
  ])('resin code of %s is %s', (name, code) => {
    expect(resinCode(name)).toBe(code);
  });

  it('numbers trial codes by year', () => {
    expect(trialCode(2026, 4)).toBe('T26-004');
    expect(trialCode(2031, 1234)).toBe('T31-1234');
    expect(trialCounter('T26-004', 2026)).toBe(4);
    expect(trialCounter('T25-004', 2026)).toBeNull();
    expect(trialCounter('whatever', 2026)).toBeNull();
  });

  it('reads its own tags back', () => {
    expect(parseTag('T26-004', treatedTag('T26-004', 'RMA', 'CP90', 3))).toEqual({ role: 'treated', species: 'RMA', resin: 'CP90', n: 3 });
    expect(parseTag('T26-004', controlTag('T26-004', 'RMA', 12))).toEqual({ role: 'control', species: 'RMA', n: 12 });
    expect(treatedTag('T26-004', 'RMA', 'CP90', 3)).toBe('T26-004-RMA-CP90-03');
    expect(parseTag('T26-005', 'T26-004-RMA-C01')).toBeNull();
    expect(parseTag('T26-004', 'T26-004-loose')).toBeNull();
  });

  it('keeps codes already in use and suffixes a clash', () => {
    const items = [
      { id: 7, name: 'Maple, red' },
      { id: 3, name: 'Red maple' },
      { id: 9, name: 'Maple, red curly' },
    ];
    expect([...assignCodes(items, new Map(), speciesCode)]).toEqual([
      [3, 'RMA'],
      [7, 'RMA2'],
      [9, 'RCMA'],
    ]);
    // Species 7 already printed RMA on its tags: it keeps it, and 3 gives way.
    expect(assignCodes(items, new Map([[7, 'RMA']]), speciesCode).get(3)).toBe('RMA2');
  });
});
