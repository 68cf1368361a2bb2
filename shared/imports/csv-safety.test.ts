import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { neutraliseCell, toSafeCsv } from './csv-safety';

// OWASP "CSV Injection": cells starting with = + - @ tab or CR are prefixed so a spreadsheet shows text.
describe('formula neutralising for CSV exports', () => {
  it.each(['=HYPERLINK("http://example.invalid","x")', '+cmd|" /C calc"!A0', '-2+3', '@SUM(A1:A2)', '\t=1', '\r=1'])('%j is made inert', (cell) => {
    expect(neutraliseCell(cell)).toBe(`'${cell}`);
    const csv = toSafeCsv([
      ['tag', 'note'],
      ['A-1', cell],
    ]);
    const back = Papa.parse<string[]>(csv).data[1]?.[1];
    expect(back).toBe(`'${cell}`);
  });

  it('leaves ordinary text and numbers alone', () => {
    expect(neutraliseCell('A-1')).toBe('A-1');
    expect(toSafeCsv([[-2.5, 'ok', null]])).toBe('-2.5,ok,');
  });
});
