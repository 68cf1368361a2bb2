import { describe, expect, it } from 'vitest';
import { detectDecimal, detectDelimiter, detectHeader, detectLineEnding, guessColumns, joinSpaceTokens, splitRows, suggestColumns } from './format';

const lines = (s: string) => s.split('\n');

describe('delimiter detection', () => {
  it.each([
    ['tag,mass,unit\nA-1,12.3,g\nA-2,12.4,g', ','],
    ['tag;mass\nA-1;12,3 g\nA-2;12,4 g', ';'],
    ['tag\tmass\nA-1\t12.3\nA-2\t12.4', '\t'],
    ['tag|mass\nA-1|12.3\nA-2|12.4', '|'],
    ['2026-03-01  10:00:01   A-1    +   12.345 g\n2026-03-01  10:00:09   A-2    +   12.401 g', 'spaces'],
    // Decimal commas inside quoted fields do not fool the comma count.
    ['"tag","mass"\n"A-1","12,3"\n"A-2","12,4"', ','],
  ] as const)('%j → %j', (text, delimiter) => {
    expect(detectDelimiter(lines(text)).delimiter).toBe(delimiter);
  });

  it('says when nothing splits the lines', () => {
    expect(detectDelimiter(['12.3 g', '12.4 g'])).toMatchObject({ columns: 1 });
  });

  it('joins a reading that runs of spaces tore apart', () => {
    expect(joinSpaceTokens(['A-1', '', '', '+', '', '12.345', 'g', 'ST'])).toEqual(['A-1', '+12.345 g', 'ST']);
    expect(splitRows('A-1    -   0.5 oz   US', 'spaces')).toEqual([['A-1', '-0.5 oz', 'US']]);
  });
});

describe('header, decimal mark and line endings', () => {
  it('finds a header of names over rows of values', () => {
    expect(
      detectHeader(
        [
          ['Tag', 'Mass'],
          ['A-1', '12.3 g'],
        ],
        '.',
      ).hasHeader,
    ).toBe(true);
    expect(
      detectHeader(
        [
          ['A-1', '12.3 g'],
          ['A-2', '12.4 g'],
        ],
        '.',
      ).hasHeader,
    ).toBe(false);
    expect(detectHeader([['Tag', 'Mass']], '.')).toMatchObject({ hasHeader: true });
  });

  it('finds a decimal comma, ignoring dates written with dots', () => {
    expect(detectDecimal([['01.03.2026', 'A-1', '12,345 g']]).decimal).toBe(',');
    expect(detectDecimal([['2026-03-01', 'A-1', '12.345 g']]).decimal).toBe('.');
    expect(detectDecimal([['ST,+0012,345 g']]).decimal).toBe(',');
    expect(detectDecimal([['A-1', '12']])).toMatchObject({ decimal: '.' });
  });

  it('names the line ending', () => {
    expect(detectLineEnding('a\r\nb')).toBe('crlf');
    expect(detectLineEnding('a\nb')).toBe('lf');
    expect(detectLineEnding('a\rb')).toBe('cr');
  });
});

describe('column guesses and the first mapping', () => {
  it('recognises tag, reading, unit, date, time and stability columns', () => {
    const header = ['Date', 'Time', 'Sample', 'Net', 'Unit', 'Status'];
    const rows = [
      ['2026-03-01', '10:00:01', 'A-01', '12.345', 'g', 'ST'],
      ['2026-03-01', '10:00:09', 'A-02', '12.401', 'g', 'US'],
    ];
    const cols = guessColumns(header, rows, '.');
    expect(cols.map((c) => c.kind)).toEqual(['date', 'time', 'tag', 'number', 'unit', 'stability']);
    expect(suggestColumns(cols)).toEqual({ dateColumn: 0, timeColumn: 1, tagColumn: 2, massColumn: 3, unitColumn: 4, stabilityColumn: 5 });
  });

  it('takes a date-time column alone and a reading with its unit', () => {
    const cols = guessColumns(null, [['2026-03-01 10:00:01', 'A-01', '+   12.345 g']], '.');
    expect(cols.map((c) => c.kind)).toEqual(['datetime', 'tag', 'reading']);
    expect(suggestColumns(cols)).toMatchObject({ dateColumn: 0, timeColumn: null, tagColumn: 1, massColumn: 2 });
  });

  it('uses known tags when given', () => {
    const known = new Set(['OAK-1']);
    const cols = guessColumns(
      null,
      [
        ['OAK-1', 'note'],
        ['OAK-1', 'other'],
      ],
      '.',
      (values) => new Set(values.filter((v) => known.has(v))),
    );
    expect(cols[0]?.kind).toBe('tag');
  });
});
