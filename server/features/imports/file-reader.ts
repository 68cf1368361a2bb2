import fs from 'node:fs';
import { Readable } from 'node:stream';
import iconv from 'iconv-lite';
import Papa from 'papaparse';
import type { ImportFormat } from '../../../shared/schemas/imports';
import { joinSpaceTokens, MAX_LINE_CHARS } from '../../../shared/imports/format';
import { Unprocessable } from '../../http/errors';

/** Bytes read from the head of a file for detection and for the sample the user maps. */
export const SAMPLE_BYTES = 64 * 1024;

export class LineTooLong extends Unprocessable {
  constructor(line: number) {
    const msg = `Line ${line} is longer than ${MAX_LINE_CHARS / 1024} KB. A scale writes short lines of readings; this does not look like one of its files`;
    super(msg, { file: [msg] });
  }
}

/**
 * Follows the lengths of the lines across the chunks of a file and throws LineTooLong at a line longer
 * than MAX_LINE_CHARS, so one endless line cannot fill the memory (papaparse keeps an unfinished line
 * until its end comes). A line ends at LF, CRLF or a lone CR. Most chunks are checked by their LF
 * positions alone (a gap between two LFs no longer than the limit holds no line too long, whatever CRs it
 * has), which costs a few ms per 4 MB where a loop over every character cost ~40 ms; a chunk with a longer
 * gap (a CR-only file, or a long line) is walked character by character.
 */
export function createLineGuard(): (chunk: string) => void {
  let run = 0; // characters of the current line so far
  let line = 1; // the current line, 1-based
  let cr = false; // the last character seen was a CR (so an LF right after it ends no further line)

  const walk = (chunk: string) => {
    for (let i = 0; i < chunk.length; i++) {
      const c = chunk.charCodeAt(i);
      if (c === 13) {
        line++;
        run = 0;
        cr = true;
        continue;
      }
      if (c === 10) {
        if (!cr) line++;
        run = 0;
      } else if (++run > MAX_LINE_CHARS) {
        throw new LineTooLong(line);
      }
      cr = false;
    }
  };

  return (chunk: string) => {
    const n = chunk.length;
    if (n === 0) return;
    let lf = 0;
    let crlf = 0;
    let gap = run; // the first segment continues the line in progress (counting CRs in it: an overestimate)
    for (let from = 0; ;) {
      const j = chunk.indexOf('\n', from);
      const end = j < 0 ? n : j;
      if (gap + end - from > MAX_LINE_CHARS) return walk(chunk);
      if (j < 0) break;
      lf++;
      if (j === 0 ? cr : chunk.charCodeAt(j - 1) === 13) crlf++;
      gap = 0;
      from = j + 1;
    }
    let crs = 0;
    for (let k = chunk.indexOf('\r'); k >= 0; k = chunk.indexOf('\r', k + 1)) crs++;
    line += lf + crs - crlf;
    const lastBreak = Math.max(chunk.lastIndexOf('\n'), chunk.lastIndexOf('\r'));
    run = lastBreak < 0 ? run + n : n - 1 - lastBreak;
    cr = chunk.charCodeAt(n - 1) === 13;
  };
}

/** The first bytes of a stored file. */
export async function readHead(file: string, bytes = SAMPLE_BYTES): Promise<{ head: Uint8Array; truncated: boolean }> {
  const fh = await fs.promises.open(file, 'r');
  try {
    const { size } = await fh.stat();
    const buf = Buffer.alloc(Math.min(bytes, size));
    const { bytesRead } = await fh.read(buf, 0, buf.length, 0);
    return { head: buf.subarray(0, bytesRead), truncated: size > bytesRead };
  } finally {
    await fh.close();
  }
}

/**
 * Decodes bytes of the given encoding, without a byte-order mark. iconv-lite rather than TextDecoder:
 * Node 20's TextDecoder reads "windows-1252" as ISO-8859-1 (0x80 → U+0080, not €), and one decoder
 * for the sample and for the whole file keeps both reading the same text.
 */
export function decode(bytes: Uint8Array, encoding: ImportFormat['encoding']): string {
  return iconv.decode(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength), encoding, { stripBOM: true });
}

/**
 * Bytes read from the file per step of streamRows: about 1,500 rows of a scale's log. 64 KB measured a little
 * cheaper than 256 KB or 1 MB (fewer parsed rows alive at each young-generation collection).
 */
const CHUNK_BYTES = 64 * 1024;
/**
 * The first step is longer: papaparse guesses the line ending (LF, CRLF or CR) from the first chunk it gets,
 * and this keeps the guess made on the same 256 KB as when the file came through a 256 KB read stream.
 */
const FIRST_CHUNK_BYTES = 256 * 1024;

/**
 * Streams a stored file through decoding, the line guard and papaparse, handing each non-empty record
 * on with its row number (1-based, the header counting as row 1, as a spreadsheet numbers them); never
 * holds more than a chunk of the file. `onProgress` gets the share of bytes read. Rejects with
 * LineTooLong for an absurd line, or with what `onRow` throws (the file is then read no further).
 *
 * Papaparse gets the decoded text a chunk at a time (its `chunk` callback, rows of a whole chunk at
 * once) and the bytes are decoded by a plain iconv-lite decoder, not a chain of Node streams: a
 * stream per stage and papaparse's row-by-row duplex stream cost most of a preview's CPU (~0.4 s of
 * a 100,000-row file).
 */
export async function streamRows(
  file: string,
  format: Pick<ImportFormat, 'encoding' | 'delimiter'>,
  onRow: (cells: string[], row: number) => void,
  onProgress?: (fraction: number) => void,
): Promise<{ records: number }> {
  const { size } = await fs.promises.stat(file);
  const decoder = iconv.getDecoder(format.encoding, { stripBOM: true });
  const guard = createLineGuard();
  async function* text() {
    const fh = await fs.promises.open(file, 'r');
    try {
      let read = 0;
      for (let step = FIRST_CHUNK_BYTES; ; step = CHUNK_BYTES) {
        const buf = Buffer.allocUnsafe(step);
        const { bytesRead } = await fh.read(buf, 0, step, null);
        if (bytesRead === 0) break;
        read += bytesRead;
        const s = decoder.write(buf.subarray(0, bytesRead));
        guard(s);
        onProgress?.(size ? read / size : 1);
        if (s) yield s;
      }
      const tail = decoder.end() ?? '';
      guard(tail);
      if (tail) yield tail;
    } finally {
      await fh.close();
    }
  }
  const source = Readable.from(text());
  const spaces = format.delimiter === 'spaces';
  let records = 0;
  await new Promise<void>((resolve, reject) => {
    let failed = false;
    const fail = (err: Error) => {
      if (failed) return;
      failed = true;
      source.destroy();
      reject(err);
    };
    source.once('error', fail);
    Papa.parse<string[]>(source, {
      delimiter: spaces ? ' ' : format.delimiter,
      skipEmptyLines: false,
      chunk: (results) => {
        if (failed) return;
        try {
          for (const data of results.data) {
            records++;
            const cells = spaces ? joinSpaceTokens(data) : data;
            if (!isBlank(cells)) onRow(cells, records);
          }
        } catch (err) {
          fail(err as Error);
        }
      },
      complete: () => {
        if (!failed) resolve();
      },
      error: (err: Error) => fail(err),
    });
  });
  return { records };
}

/** A record of empty or blank fields (an empty line, or a line of separators only). */
function isBlank(cells: string[]): boolean {
  for (const c of cells) {
    if (c.length === 0) continue;
    // The common case first: a field that starts with a visible ASCII character (trim() removes more than ASCII blanks).
    const first = c.charCodeAt(0);
    if ((first > 32 && first < 127) || c.trim() !== '') return false;
  }
  return true;
}
