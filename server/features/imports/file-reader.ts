import fs from 'node:fs';
import { Transform, type Duplex, type TransformCallback } from 'node:stream';
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

/** Stops the stream at a line longer than MAX_LINE_CHARS, so one endless line cannot fill the memory. */
class LineGuard extends Transform {
  private run = 0;
  private line = 1;
  override _transform(chunk: string, _enc: BufferEncoding, done: TransformCallback) {
    for (let i = 0; i < chunk.length; i++) {
      const c = chunk.charCodeAt(i);
      if (c === 10 || c === 13) {
        if (c === 10 || chunk.charCodeAt(i + 1) !== 10) this.line++;
        this.run = 0;
      } else if (++this.run > MAX_LINE_CHARS) {
        return done(new LineTooLong(this.line));
      }
    }
    done(null, chunk);
  }
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

/** Decodes bytes of the given encoding, without a byte-order mark. */
export function decode(bytes: Uint8Array, encoding: ImportFormat['encoding']): string {
  return iconv.decode(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength), encoding, { stripBOM: true });
}

export interface StreamedRow {
  /** 1-based record number in the file, the header counting as row 1, as a spreadsheet numbers them. */
  row: number;
  cells: string[];
}

/**
 * Streams a stored file through decoding, the line guard and papaparse, handing each non-empty record
 * on with its row number; never holds more than a chunk of the file. `onProgress` gets the share of
 * bytes read. Rejects with LineTooLong for an absurd line.
 */
export async function streamRows(
  file: string,
  format: Pick<ImportFormat, 'encoding' | 'delimiter'>,
  onRow: (r: StreamedRow) => void,
  onProgress?: (fraction: number) => void,
): Promise<{ records: number }> {
  const { size } = await fs.promises.stat(file);
  const source = fs.createReadStream(file, { highWaterMark: 256 * 1024 });
  let read = 0;
  source.on('data', (chunk) => {
    read += chunk.length;
    onProgress?.(size ? read / size : 1);
  });
  const papa = Papa.parse(Papa.NODE_STREAM_INPUT, { delimiter: format.delimiter === 'spaces' ? ' ' : format.delimiter, skipEmptyLines: false });
  const decoder = iconv.decodeStream(format.encoding, { stripBOM: true }) as unknown as Transform;
  const guard = new LineGuard({ decodeStrings: false, encoding: 'utf8' });
  const streams: Duplex[] = [source as unknown as Duplex, decoder, guard, papa];
  const fail = (err: Error) => {
    for (const s of streams) s.destroy(err);
  };
  for (const s of streams.slice(0, 3)) s.on('error', fail);
  source.pipe(decoder).pipe(guard).pipe(papa);
  // Rows are taken as papaparse emits them ('data' in flowing mode), never through the async iterator:
  // an iterator leaves rows in the readable buffer, papaparse pauses at 16 buffered rows and, on resume,
  // parses the rest of its 256 KB chunk again from the start — quadratic, 18 s of a 100k-row file.
  let records = 0;
  await new Promise<void>((resolve, reject) => {
    papa.on('data', (data: string[]) => {
      records++;
      const cells = format.delimiter === 'spaces' ? joinSpaceTokens(data) : data;
      if (cells.every((c) => c.trim() === '')) return;
      try {
        onRow({ row: records, cells });
      } catch (err) {
        fail(err as Error);
        reject(err as Error);
      }
    });
    papa.on('end', () => resolve());
    papa.on('error', reject);
  });
  return { records };
}
