/**
 * What a key pressed in a cell of the entry grid does, as a pure function of the key, the cell and the
 * text box's caret, so the spreadsheet habits are tested without a browser.
 *
 * Conventions (common practice in spreadsheets): Tab / Shift+Tab across and wrapping to the next / previous
 * row, Enter / Shift+Enter down / up, arrows up and down always, left and right only at the edge of the
 * text (or when the whole text is selected, as it is on arrival), Home / End to the row's first / last cell
 * on the same condition, Ctrl+Home / Ctrl+End to the grid's first / last cell, Page Up / Page Down by a
 * screenful of rows, Esc undoes the typed cell or leaves for the Save button.
 */

export interface KeyPress {
  key: string;
  shiftKey?: boolean;
  ctrlKey?: boolean;
  metaKey?: boolean;
  altKey?: boolean;
}

/** Where the caret is in the cell's text box. */
export interface Caret {
  start: number;
  end: number;
  length: number;
}

export interface KeyContext {
  r: number;
  c: number;
  rows: number;
  cols: number;
  caret: Caret;
  /** Rows that one Page Up / Page Down moves. */
  pageRows: number;
  /** The cell holds a typed, unsaved value (Esc undoes it). */
  hasDraft: boolean;
}

export type KeyAction =
  /** Move to the cell (always inside the grid); the key's default is prevented. */
  | { kind: 'move'; r: number; c: number }
  /** Undo the cell's typed value. */
  | { kind: 'undo' }
  /** Leave the grid for the Save button. */
  | { kind: 'leave' }
  /** Let the browser do what it does (type, move the caret, Tab out of the grid). */
  | { kind: 'default' };

const clamp = (v: number, lo: number, hi: number) => Math.min(Math.max(v, lo), hi);

export function keyAction(press: KeyPress, ctx: KeyContext): KeyAction {
  const { r, c, rows, cols, caret } = ctx;
  if (rows <= 0 || cols <= 0) return { kind: 'default' };
  const last = { r: rows - 1, c: cols - 1 };
  const move = (nr: number, nc: number): KeyAction => ({ kind: 'move', r: clamp(nr, 0, last.r), c: clamp(nc, 0, last.c) });
  const whole = caret.start === 0 && caret.end === caret.length;
  const atStart = caret.end === 0 || whole;
  const atEnd = caret.start === caret.length || whole;
  const ctrl = press.ctrlKey === true || press.metaKey === true;
  if (press.altKey) return { kind: 'default' };
  switch (press.key) {
    case 'Tab':
      if (ctrl) return { kind: 'default' };
      // From the last cell Tab leaves the grid (and from the first, Shift+Tab), so the page never traps focus.
      if (press.shiftKey) {
        if (r === 0 && c === 0) return { kind: 'default' };
        return c > 0 ? move(r, c - 1) : move(r - 1, last.c);
      }
      if (r === last.r && c === last.c) return { kind: 'default' };
      return c < last.c ? move(r, c + 1) : move(r + 1, 0);
    case 'Enter':
      // Ctrl+Enter is left to the page (a form's submit, a screen reader's command).
      if (ctrl) return { kind: 'default' };
      return move(r + (press.shiftKey ? -1 : 1), c);
    case 'ArrowDown':
      return move(r + 1, c);
    case 'ArrowUp':
      return move(r - 1, c);
    case 'ArrowLeft':
      // Shift+arrow selects text; the caret's own moves stay with the text box until it is at the edge.
      return !press.shiftKey && atStart ? move(r, c - 1) : { kind: 'default' };
    case 'ArrowRight':
      return !press.shiftKey && atEnd ? move(r, c + 1) : { kind: 'default' };
    case 'Home':
      if (ctrl) return move(0, 0);
      return !press.shiftKey && atStart ? move(r, 0) : { kind: 'default' };
    case 'End':
      if (ctrl) return move(last.r, last.c);
      return !press.shiftKey && atEnd ? move(r, last.c) : { kind: 'default' };
    case 'PageDown':
      return move(r + Math.max(1, ctx.pageRows), c);
    case 'PageUp':
      return move(r - Math.max(1, ctx.pageRows), c);
    case 'Escape':
      return ctx.hasDraft ? { kind: 'undo' } : { kind: 'leave' };
    default:
      return { kind: 'default' };
  }
}
