import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { openDatabase } from '../server/db/client';
import { seedDemo } from '../server/seed';
import { collectReadings } from '../server/features/imports/collect';
import { streamRows } from '../server/features/imports/file-reader';
import { importMappingSchema } from '../shared/schemas/imports';
import { addCoupons, scaleFile } from './imports-server';

// The reading half of an import's preview, alone and repeatable: the generated scale file of
// bench/imports-server.ts read through the mapping (collectReadings: stream, decode, parse, read each row,
// match its tag) against a database of as many coupons, in this process, without HTTP or the judgement.
// CPU time by process.cpuUsage() (holds better than wall time on a shared machine), median of RUNS runs, with
// no forced garbage collection between them (a forced full collection shrinks the young generation, and the
// next run then pays for more, smaller collections than a server would).
// Run: `npx tsx bench/import-collect.ts [rows]` (with `node --expose-gc --import tsx` it also reports the
// heap the collected readings hold). Writes bench/import-collect-latest.txt.

const RUNS = 5;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] as number;
const cpuMs = (u: NodeJS.CpuUsage) => (u.user + u.system) / 1000;

export async function measureCollect(n: number): Promise<string> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-import-collect-'));
  const d = openDatabase(path.join(dir, 'lumenbook.db'));
  try {
    seedDemo(d, { bcryptCost: 4 });
    addCoupons(d, n);
    const file = path.join(dir, 'scale.csv');
    fs.writeFileSync(file, `${scaleFile(n)}\r\n`);
    // The mapping bench/imports-server.ts previews with, through the API's schema (its defaults filled in).
    const mapping = importMappingSchema.parse({
      format: { encoding: 'utf-8', delimiter: ',', hasHeader: true, decimal: '.', dateOrder: 'ymd' },
      target: { mode: 'tag', tagColumn: 0 },
      massColumn: 1,
      unitColumn: 2,
      dateColumn: 3,
      timeColumn: 4,
      stage: 'dry',
    });
    const r = { createdAt: new Date().toISOString() };
    const gc = (globalThis as { gc?: () => void }).gc;

    const time = async (work: () => Promise<unknown>) => {
      const cpu: number[] = [];
      const wall: number[] = [];
      for (let i = 0; i < RUNS; i++) {
        const t0 = performance.now();
        const c0 = process.cpuUsage();
        await work();
        cpu.push(cpuMs(process.cpuUsage(c0)));
        wall.push(performance.now() - t0);
      }
      return { cpu: median(cpu), wall: median(wall), all: cpu.map((x) => x.toFixed(0)).join(' ') };
    };

    let held = '';
    if (gc) {
      // First, on a fresh heap: what one preview's collected readings hold: the heap after the reading (garbage collected) less the heap before.
      gc();
      const before = process.memoryUsage().heapUsed;
      const c = await collectReadings(d.db, file, r, mapping, () => undefined);
      gc();
      held = `, heap held by the collected readings ${((process.memoryUsage().heapUsed - before) / 1048576).toFixed(1)} MB`;
      if (c.row.length !== n) throw new Error('lost rows');
    }
    const parse = await time(() => streamRows(file, mapping.format, () => undefined));
    let rows = 0;
    const collect = await time(async () => {
      const c = await collectReadings(d.db, file, r, mapping, () => undefined);
      rows = c.row.length;
    });
    if (rows !== n) throw new Error(`collected ${rows} readings of ${n}`);
    // The same rows in a shuffled order (a fixed linear congruential sequence, Numerical Recipes' constants):
    // the tags no longer follow the coupons' order, so every row is matched through the map of all tags.
    const [header, ...body] = scaleFile(n).split('\r\n');
    let seed = 1;
    const shuffledRows = body.map((line) => ({ line, key: (seed = (seed * 1664525 + 1013904223) >>> 0) })).sort((a, b) => a.key - b.key);
    const shuffledFile = path.join(dir, 'shuffled.csv');
    fs.writeFileSync(shuffledFile, `${[header, ...shuffledRows.map((x) => x.line)].join('\r\n')}\r\n`);
    const shuffled = await time(() => collectReadings(d.db, shuffledFile, r, mapping, () => undefined));
    const f = (x: { cpu: number; wall: number; all: string }) => `${x.cpu.toFixed(0)} ms CPU (runs: ${x.all}), ${x.wall.toFixed(0)} ms wall`;
    return [
      `Written by bench/import-collect.ts on ${new Date().toISOString()}, load average ${os
        .loadavg()
        .map((x) => x.toFixed(2))
        .join(', ')} (${os.cpus().length} cores, shared machine); median of ${RUNS}`,
      `reading a ${n}-row scale file (${(fs.statSync(file).size / 1048576).toFixed(1)} MB) against ${n} coupons:`,
      `  streamRows alone (read, decode, line guard, papaparse): ${f(parse)}`,
      `  collectReadings (the above + each row read through the mapping + tag lookup): ${f(collect)}${held}`,
      `  collectReadings of the same rows shuffled (tags out of the coupons' order): ${f(shuffled)}`,
    ].join('\n');
  } finally {
    d.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const text = await measureCollect(Number(process.argv[2] ?? 100_000));
  console.log(text);
  fs.writeFileSync(path.join(path.dirname(fileURLToPath(import.meta.url)), 'import-collect-latest.txt'), `${text}\n`);
}
