import Papa from 'papaparse';

/**
 * Characters that make a spreadsheet read a cell as a formula (or, for tab and carriage return, hide
 * one), per the OWASP "CSV Injection" guidance: =, +, -, @, tab, carriage return.
 */
export const FORMULA_START = /^[=+\-@\t\r]/;

/** A text cell made inert for spreadsheets: a leading apostrophe, which they show as text. */
export function neutraliseCell(value: string): string {
  return FORMULA_START.test(value) ? `'${value}` : value;
}

/**
 * Rows to CSV for any export of stored text: papaparse quotes as RFC 4180 wants and, with
 * `escapeFormulae`, prefixes every text cell that starts like a formula. Numbers stay numbers.
 */
export function toSafeCsv(rows: (string | number | null)[][]): string {
  return Papa.unparse(
    rows.map((r) => r.map((c) => c ?? '')),
    { escapeFormulae: true, newline: '\r\n' },
  );
}
