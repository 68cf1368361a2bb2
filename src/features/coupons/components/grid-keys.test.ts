import { describe, expect, it } from 'vitest';
import { keyAction, type KeyContext } from './grid-keys';

const ctx = (over: Partial<KeyContext> = {}): KeyContext => ({
  r: 1,
  c: 1,
  rows: 3,
  cols: 4,
  caret: { start: 0, end: 2, length: 2 }, // the whole text selected, as on arrival in a cell
  pageRows: 10,
  hasDraft: false,
  ...over,
});
const mid = { start: 1, end: 1, length: 2 };

describe('keyAction', () => {
  it.each([
    ['Tab', {}, { r: 1, c: 2 }],
    ['Tab', { shiftKey: true }, { r: 1, c: 0 }],
    ['Enter', {}, { r: 2, c: 1 }],
    ['Enter', { shiftKey: true }, { r: 0, c: 1 }],
    ['ArrowDown', {}, { r: 2, c: 1 }],
    ['ArrowUp', {}, { r: 0, c: 1 }],
    ['ArrowLeft', {}, { r: 1, c: 0 }],
    ['ArrowRight', {}, { r: 1, c: 2 }],
    ['Home', {}, { r: 1, c: 0 }],
    ['End', {}, { r: 1, c: 3 }],
    ['Home', { ctrlKey: true }, { r: 0, c: 0 }],
    ['End', { metaKey: true }, { r: 2, c: 3 }],
    ['PageDown', {}, { r: 2, c: 1 }],
    ['PageUp', {}, { r: 0, c: 1 }],
  ])('%s %o moves to %o', (key, mods, to) => {
    expect(keyAction({ key, ...mods }, ctx())).toEqual({ kind: 'move', ...to });
  });

  it('wraps Tab to the next row and Shift+Tab to the previous one', () => {
    expect(keyAction({ key: 'Tab' }, ctx({ c: 3 }))).toEqual({ kind: 'move', r: 2, c: 0 });
    expect(keyAction({ key: 'Tab', shiftKey: true }, ctx({ c: 0 }))).toEqual({ kind: 'move', r: 0, c: 3 });
  });

  it('lets Tab leave the grid from the last cell, and Shift+Tab from the first, so focus is never trapped', () => {
    expect(keyAction({ key: 'Tab' }, ctx({ r: 2, c: 3 }))).toEqual({ kind: 'default' });
    expect(keyAction({ key: 'Tab', shiftKey: true }, ctx({ r: 0, c: 0 }))).toEqual({ kind: 'default' });
  });

  it('stays inside the grid at its edges', () => {
    expect(keyAction({ key: 'ArrowUp' }, ctx({ r: 0 }))).toEqual({ kind: 'move', r: 0, c: 1 });
    expect(keyAction({ key: 'Enter' }, ctx({ r: 2 }))).toEqual({ kind: 'move', r: 2, c: 1 });
    expect(keyAction({ key: 'PageDown' }, ctx({ rows: 500, r: 495, pageRows: 12 }))).toEqual({ kind: 'move', r: 499, c: 1 });
  });

  it('leaves left, right, Home and End to the text box while the caret is inside the text', () => {
    for (const key of ['ArrowLeft', 'ArrowRight', 'Home', 'End']) expect(keyAction({ key }, ctx({ caret: mid }))).toEqual({ kind: 'default' });
    expect(keyAction({ key: 'ArrowLeft' }, ctx({ caret: { start: 0, end: 0, length: 2 } }))).toEqual({ kind: 'move', r: 1, c: 0 });
    expect(keyAction({ key: 'ArrowRight' }, ctx({ caret: { start: 2, end: 2, length: 2 } }))).toEqual({ kind: 'move', r: 1, c: 2 });
    // Shift+arrow selects text.
    expect(keyAction({ key: 'ArrowLeft', shiftKey: true }, ctx())).toEqual({ kind: 'default' });
  });

  it('undoes a typed cell with Esc, or leaves for the Save button', () => {
    expect(keyAction({ key: 'Escape' }, ctx({ hasDraft: true }))).toEqual({ kind: 'undo' });
    expect(keyAction({ key: 'Escape' }, ctx())).toEqual({ kind: 'leave' });
  });

  it('leaves typing, Ctrl+Enter and Alt combinations to the browser', () => {
    expect(keyAction({ key: '5' }, ctx())).toEqual({ kind: 'default' });
    expect(keyAction({ key: 'Enter', ctrlKey: true }, ctx())).toEqual({ kind: 'default' });
    expect(keyAction({ key: 'ArrowDown', altKey: true }, ctx())).toEqual({ kind: 'default' });
    expect(keyAction({ key: 'Tab' }, ctx({ rows: 0 }))).toEqual({ kind: 'default' });
  });
});
