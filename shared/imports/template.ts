import type { ImportDelimiter } from './format';

/**
 * The file layout Lumenbook suggests to a shop whose scale writes nothing usable: one reading per
 * line, with its coupon tag, the mass, its unit, the date (year first) and time, and whether the balance
 * showed the reading as stable. The example rows are invented.
 */
export const TEMPLATE_HEADER = ['tag', 'mass', 'unit', 'date', 'time', 'stable'] as const;

export function templateCsv(): string {
  const rows = [TEMPLATE_HEADER.join(','), 'EX-01,12.345,g,2026-03-01,09:15:00,yes', 'EX-02,11.902,g,2026-03-01,09:16:10,yes'];
  return `${rows.join('\r\n')}\r\n`;
}

/**
 * Files of the same shape — the same header (case and spacing aside) and separator, or for headerless
 * files the same number of columns — get the same key, so a saved mapping can be offered for them.
 */
export function shapeKey(header: string[] | null, delimiter: ImportDelimiter, columnCount: number): string {
  const names = header ? header.map((h) => h.trim().toLowerCase().replace(/\s+/g, ' ')).join('\u001f') : `#${columnCount}`;
  return `${delimiter === '\t' ? 'tab' : delimiter}|${names}`;
}
