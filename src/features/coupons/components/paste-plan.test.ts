import { describe, expect, it } from 'vitest';
import { parseClipboard, pasteSummary, planPaste } from './paste-plan';

describe('parseClipboard', () => {
  it('reads a copied block: tabs across, line breaks down, the closing line break dropped', () => {
    expect(parseClipboard('20.48\t120.2\r\n18,9\t25.1\r\n')).toEqual([
      ['20.48', '120.2'],
      ['18,9', '25.1'],
    ]);
  });

  it('keeps a quoted cell with a line break, a tab or a quote as one cell', () => {
    expect(parseClipboard('"a\nb"\t"c\td"\n"say ""hi"""\t2\n')).toEqual([
      ['a\nb', 'c\td'],
      ['say "hi"', '2'],
    ]);
  });

  it('leaves a single value to the browser', () => {
    expect(parseClipboard('21.5')).toBeNull();
    expect(parseClipboard('21.5\n')).toBeNull();
    expect(parseClipboard('')).toBeNull();
  });

  it('keeps empty cells in place so columns stay aligned', () => {
    expect(parseClipboard('1\t\t3\n\t5\t\n')).toEqual([
      ['1', '', '3'],
      ['', '5', ''],
    ]);
  });
});

describe('planPaste', () => {
  const rows = ['A', 'B', 'C'];
  const columns = ['dry', 'cured'];
  const target = { rows, columns, locked: (row: string, col: string) => row === 'B' && col === 'dry' };

  it('fills down and across from the cell, leaves locked cells alone, and counts what fell off the grid', () => {
    const plan = planPaste(
      [
        ['1', '2', '9'],
        ['3', '4'],
        ['5', ''],
        ['7', '8'],
      ],
      0,
      0,
      target,
    );
    expect(plan.cells.map((x) => `${x.row}.${x.col}=${x.value}`)).toEqual(['A.dry=1', 'A.cured=2', 'B.cured=4', 'C.dry=5', 'C.cured=']);
    expect(plan).toMatchObject({ filled: 5, skipped: 1, dropped: 3 });
    expect(pasteSummary(plan)).toBe('Pasted 5 values; 1 cell already holding a saved value left alone; 3 values past the end of the grid dropped.');
  });
});
