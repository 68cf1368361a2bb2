import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import iconv from 'iconv-lite';
import Papa from 'papaparse';
import { afterAll, describe, expect, it } from 'vitest';
import { MAX_LINE_CHARS } from '../../../shared/imports/format';
import { createLineGuard, LineTooLong, streamRows } from './file-reader';

// A fixed linear congruential sequence (Numerical Recipes' constants): the same inputs on every run.
function sequence(seed: number) {
  return () => (seed = (seed * 1664525 + 1013904223) >>> 0) / 2 ** 32;
}

/** The line guard's answer for a whole text, character by character: the line too long, or null. */
function longLine(text: string): number | null {
  let run = 0;
  let line = 1;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '\r' || c === '\n') {
      if (c === '\r' || text[i - 1] !== '\r') line++;
      run = 0;
    } else if (++run > MAX_LINE_CHARS) return line;
  }
  return null;
}

function guardAnswer(chunks: string[]): number | null {
  const guard = createLineGuard();
  try {
    for (const c of chunks) guard(c);
    return null;
  } catch (e) {
    if (!(e instanceof LineTooLong)) throw e;
    return Number(/Line (\d+)/.exec(e.message)?.[1]);
  }
}

describe('the line guard', () => {
  it('finds the line too long wherever the chunks split the text, with LF, CRLF and lone CR line ends', () => {
    const next = sequence(7);
    const ends = ['\n', '\r\n', '\r'];
    for (let k = 0; k < 60; k++) {
      const lines: string[] = [];
      const count = 1 + Math.floor(next() * 12);
      for (let i = 0; i < count; i++) {
        // Mostly short lines, some near the limit, now and then one over it.
        const r = next();
        const len = r < 0.7 ? Math.floor(next() * 50) : r < 0.95 ? MAX_LINE_CHARS - 2 + Math.floor(next() * 3) : MAX_LINE_CHARS + 1;
        lines.push('x'.repeat(len) + (ends[Math.floor(next() * 3)] as string));
      }
      const text = lines.join('');
      const chunks: string[] = [];
      for (let at = 0; at < text.length;) {
        const size = next() < 0.3 ? 1 + Math.floor(next() * 3) : Math.floor(next() * 100_000);
        chunks.push(text.slice(at, at + size));
        at += size;
      }
      expect(guardAnswer(chunks), `case ${k}`).toBe(longLine(text));
    }
  });

  it('counts a CRLF split between two chunks as one line end', () => {
    const long = 'x'.repeat(MAX_LINE_CHARS + 1);
    expect(guardAnswer(['a\r', '\nb\r', '\n', long])).toBe(3);
    expect(guardAnswer(['a\r', 'b\r', long])).toBe(3);
  });
});

describe('streamRows', () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-file-reader-'));
  afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

  /** ~700 KB of rows (several read chunks) with accents, €, quoted fields holding separators and line ends, blank lines. */
  function text(delimiter: string, newline: string): string {
    const next = sequence(11);
    const rows = ['tag,mass,note'.replaceAll(',', delimiter)];
    for (let i = 0, length = 0; length < 700_000; i++) {
      const r = next();
      const note = r < 0.1 ? `"quoted${delimiter} with ""marks""${newline}and a line end"` : r < 0.2 ? 'é € ü ß' : r < 0.25 ? '' : `n${i}`;
      const row = r > 0.97 ? '' : [`BX-${i}`, `${(10 + i / 1000).toFixed(3)}`, note].join(delimiter);
      rows.push(row);
      length += row.length + newline.length;
    }
    return `${rows.join(newline)}${newline}`;
  }

  /** The non-blank rows papaparse finds in the whole text at once, numbered from 1. */
  function whole(t: string, delimiter: string) {
    const out: { row: number; cells: string[] }[] = [];
    Papa.parse<string[]>(t, { delimiter, skipEmptyLines: false }).data.forEach((cells, i) => {
      if (!cells.every((c) => c.trim() === '')) out.push({ row: i + 1, cells });
    });
    return out;
  }

  it.each([
    ['utf-8', ',', '\r\n', ''],
    ['utf-8', ';', '\n', '\ufeff'],
    ['utf-16le', '\t', '\r\n', '\ufeff'],
    ['utf-16be', ',', '\n', '\ufeff'],
    ['windows-1252', ';', '\r\n', ''],
  ] as const)('reads a %s file (separator %j) as papaparse reads the whole text', async (encoding, delimiter, newline, bom) => {
    const t = text(delimiter, newline);
    const file = path.join(dir, `${encoding}.csv`);
    fs.writeFileSync(file, iconv.encode(bom + t, encoding));
    const got: { row: number; cells: string[] }[] = [];
    const progress: number[] = [];
    await streamRows(
      file,
      { encoding, delimiter },
      (cells, row) => got.push({ row, cells }),
      (f) => progress.push(f),
    );
    expect(got).toEqual(whole(t, delimiter));
    expect(progress.length).toBeGreaterThan(2);
    expect(progress.at(-1)).toBe(1);
  });

  it.each([
    ['an empty file', ''],
    ['a byte-order mark alone', '\ufeff'],
    ['one line without a line end', 'BX-1,12.3'],
    ['rows without a last line end', 'tag,mass\r\nBX-1,12.3\r\n\r\nBX-2,"4\r\n5"'],
    ['a quoted field left open', 'tag,mass\nBX-1,"12.3\nBX-2,4'],
  ])('reads %s as papaparse reads the whole text', async (_name, t) => {
    const file = path.join(dir, 'edge.csv');
    fs.writeFileSync(file, t);
    const got: { row: number; cells: string[] }[] = [];
    await streamRows(file, { encoding: 'utf-8', delimiter: ',' }, (cells, row) => got.push({ row, cells }));
    expect(got).toEqual(whole(t.replace(/^\ufeff/, ''), ','));
  });

  it('stops at a line of 10 MB, naming it, and at what the row callback throws', async () => {
    const file = path.join(dir, 'long.csv');
    fs.writeFileSync(file, `tag,mass\r\nBX-1,12.3\r\n${'9'.repeat(10 * 1024 * 1024)}\r\n`);
    await expect(streamRows(file, { encoding: 'utf-8', delimiter: ',' }, () => undefined)).rejects.toThrow(/^Line 3 is longer than 64 KB/);
    const rows: number[] = [];
    const small = path.join(dir, 'small.csv');
    fs.writeFileSync(small, text(',', '\n'));
    const stop = new Error('stop');
    await expect(
      streamRows(small, { encoding: 'utf-8', delimiter: ',' }, (_cells, row) => {
        rows.push(row);
        if (row === 3) throw stop;
      }),
    ).rejects.toBe(stop);
    expect(rows).toEqual([1, 2, 3]);
  });
});
