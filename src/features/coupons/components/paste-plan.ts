import Papa from 'papaparse';

/**
 * Cells copied from a spreadsheet, as rows of text: tab-separated lines, read with papaparse so a quoted
 * cell holding a tab, a line break or a quote comes through as one cell. `null` when the clipboard holds a
 * single cell (the browser then pastes it into the box as usual).
 */
export function parseClipboard(text: string): string[][] | null {
  const normalized = text.replace(/\r\n?/g, '\n');
  const parsed = Papa.parse<string[]>(normalized, { delimiter: '\t', newline: '\n', quoteChar: '"', skipEmptyLines: false });
  const rows = parsed.data.map((row) => row.map((cell) => cell.trim()));
  // A copied block ends with a line break: drop the empty rows it leaves.
  while (rows.length > 0 && rows[rows.length - 1]!.every((cell) => cell === '')) rows.pop();
  if (rows.length === 0 || (rows.length === 1 && rows[0]!.length === 1)) return null;
  return rows;
}

export interface PasteTarget<Row, Col> {
  rows: readonly Row[];
  columns: readonly Col[];
  /** A cell that already holds a saved value is left alone (it is corrected with a reason elsewhere). */
  locked: (row: Row, col: Col) => boolean;
}

export interface PastePlan<Row, Col> {
  cells: { row: Row; col: Col; value: string }[];
  filled: number;
  /** Non-empty values that would land on a locked cell. */
  skipped: number;
  /** Non-empty values past the last row or column. */
  dropped: number;
}

/** Where each pasted value goes, starting at row `r`, column `c` and filling down and to the right. */
export function planPaste<Row, Col>(block: readonly (readonly string[])[], r: number, c: number, target: PasteTarget<Row, Col>): PastePlan<Row, Col> {
  const plan: PastePlan<Row, Col> = { cells: [], filled: 0, skipped: 0, dropped: 0 };
  block.forEach((line, i) => {
    line.forEach((value, j) => {
      const row = target.rows[r + i];
      const col = target.columns[c + j];
      if (row === undefined || col === undefined) {
        if (value !== '') plan.dropped++;
        return;
      }
      if (target.locked(row, col)) {
        if (value !== '') plan.skipped++;
        return;
      }
      plan.cells.push({ row, col, value });
      plan.filled++;
    });
  });
  return plan;
}

/** The status line after a paste. */
export function pasteSummary(plan: Pick<PastePlan<unknown, unknown>, 'filled' | 'skipped' | 'dropped'>): string {
  const parts = [`Pasted ${plan.filled} value${plan.filled === 1 ? '' : 's'}`];
  if (plan.skipped) parts.push(`${plan.skipped} cell${plan.skipped === 1 ? '' : 's'} already holding a saved value left alone`);
  if (plan.dropped) parts.push(`${plan.dropped} value${plan.dropped === 1 ? '' : 's'} past the end of the grid dropped`);
  return `${parts.join('; ')}.`;
}
