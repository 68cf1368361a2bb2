import type { Response } from 'express';
import { toSafeCsv } from '../../shared/imports/csv-safety';

type Row = (string | number | null)[];

/** Rows per written chunk. */
const CHUNK = 500;

/**
 * Answers a CSV download from rows produced a page at a time: each chunk goes through `toSafeCsv`
 * (formula-looking text neutralised) and is written as it comes, waiting for the socket to drain and
 * giving the event loop a turn between chunks, so a 100 000-row export neither sits in memory whole nor
 * keeps other requests waiting. The first row is read before any header is sent, so an error in the
 * query still gets the JSON error envelope.
 */
export async function sendCsv(res: Response, filename: string, rows: Iterator<Row>): Promise<void> {
  let next = rows.next();
  res.setHeader('Content-Type', 'text/csv; charset=utf-8');
  res.setHeader('Content-Disposition', `attachment; filename="${filename}"`);
  res.setHeader('Cache-Control', 'no-store');
  res.status(200);
  while (!next.done) {
    const chunk: Row[] = [];
    while (!next.done && chunk.length < CHUNK) {
      chunk.push(next.value);
      next = rows.next();
    }
    if (res.destroyed) return;
    if (!res.write(`${toSafeCsv(chunk)}\r\n`)) await new Promise<void>((resolve) => res.once('drain', resolve));
    else await new Promise<void>((resolve) => setImmediate(resolve));
  }
  res.end();
}
