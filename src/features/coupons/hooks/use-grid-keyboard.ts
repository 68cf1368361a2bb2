import { useCallback, useRef, type KeyboardEvent } from 'react';
import { keyAction } from '../components/grid-keys';

export interface GridKeyboardOptions {
  rows: number;
  cols: number;
  /** Rows one Page Up / Page Down moves: what the scroll box shows. */
  pageRows: () => number;
  hasDraft: (r: number, c: number) => boolean;
  moveTo: (r: number, c: number) => void;
  undo: (r: number, c: number) => void;
  leave: () => void;
}

/**
 * The entry grid's key handler: reads the caret, asks `keyAction` what the key means, and does it. The
 * handler keeps one identity for the grid's life (the options are read through a ref), so memoized cells
 * that receive it never re-render because of it.
 */
export function useGridKeyboard(options: GridKeyboardOptions): (e: KeyboardEvent<HTMLInputElement>, r: number, c: number) => void {
  const ref = useRef(options);
  ref.current = options;
  return useCallback((e: KeyboardEvent<HTMLInputElement>, r: number, c: number) => {
    const o = ref.current;
    const input = e.currentTarget;
    const action = keyAction(e, {
      r,
      c,
      rows: o.rows,
      cols: o.cols,
      caret: { start: input.selectionStart ?? 0, end: input.selectionEnd ?? 0, length: input.value.length },
      pageRows: o.pageRows(),
      hasDraft: o.hasDraft(r, c),
    });
    if (action.kind === 'default') return;
    e.preventDefault();
    if (action.kind === 'move') o.moveTo(action.r, action.c);
    else if (action.kind === 'undo') o.undo(r, c);
    else o.leave();
  }, []);
}
