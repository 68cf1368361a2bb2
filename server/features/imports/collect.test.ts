import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase, type Database_ } from '../../db/client';
import { importMappingSchema, type ImportMappingInput } from '../../../shared/schemas/imports';
import { collectReadings } from './collect';
import type { Collected } from './commit';

// Matching a file's tags: the coupon after the last one matched is tried first, the map of all tags only
// when that guess fails; whatever the order of the rows, each row must get the coupon the map gives it.
describe('collectReadings', () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-collect-'));
  let d: Database_;
  const ids: Record<string, number> = {};
  // In id order: a run of tags, a tag whose case differs from a file's, two tags equal but for case.
  const tags = [...Array.from({ length: 40 }, (_, i) => `BX-${String(i).padStart(3, '0')}`), 'Mixed-7', 'ab-1', 'AB-1', 'CT-9'];

  beforeAll(() => {
    d = openDatabase(path.join(dir, 'lumenbook.db'));
    const sp = d.sqlite
      .prepare(
        "insert into species (common_name, botanical_name, source, origin) values ('Test wood', 'Lignum probandi', 'invented for a test', 'shop-measured')",
      )
      .run();
    const ins = d.sqlite.prepare('insert into coupons (tag, species_id, role) values (?, ?, ?)');
    for (const tag of tags) ids[tag] = Number(ins.run(tag, sp.lastInsertRowid, tag === 'CT-9' ? 'control' : 'treated').lastInsertRowid);
  });
  afterAll(() => {
    d.close();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  const mapping = (over: Partial<ImportMappingInput> = {}) =>
    importMappingSchema.parse({
      format: { encoding: 'utf-8', delimiter: ',', hasHeader: true, decimal: '.', dateOrder: 'ymd' },
      target: { mode: 'tag', tagColumn: 0 },
      massColumn: 1,
      dateColumn: 2,
      timeColumn: 3,
      stage: 'dry',
      ...over,
    });

  async function collect(lines: string[], over: Partial<ImportMappingInput> = {}): Promise<Collected> {
    const file = path.join(dir, `f${Math.random().toString(36).slice(2)}.csv`);
    fs.writeFileSync(file, ['tag,mass,date,time', ...lines].join('\r\n'));
    return collectReadings(d.db, file, { createdAt: '2026-03-02T12:00:00.000Z' }, mapping(over), () => undefined);
  }

  /** What each file row got: its coupon's tag, or the codes of its problems. */
  function byRow(c: Collected): Map<number, string> {
    const out = new Map<number, string>();
    c.row.forEach((row, i) => out.set(row, `${c.coupon[i]!.tag}${c.replacedBy[i] ? ` replaced by ${c.replacedBy[i]}` : ''}`));
    for (const p of c.problems) out.set(p.row, `${out.get(p.row) ?? ''}${p.code}${p.suggestions.length ? ` (${p.suggestions.join(' ')})` : ''};`);
    return out;
  }

  // prettier-ignore
  const lines = [
    ...tags.slice(0, 40).map((t, i) => `${t},${10 + i / 10},2026-03-02,08:00:${String(i).padStart(2, '0')}`),
    'BX-005,11.1,2026-03-02,09:00:00', // weighed again: the earlier reading is replaced
    'mixed-7,12,2026-03-02,09:00:01', // only one coupon in any case
    'Ab-1,12,2026-03-02,09:00:02', // two coupons in any case: unknown
    'ab-1,12,2026-03-02,09:00:03',
    'BX-0O1,12,2026-03-02,09:00:04', // unknown, near BX-001
    'CT-9,12,2026-03-02,09:00:05',
    'BX-039,12,2026-03-02,09:00:06',
    'BX-039,abc,2026-03-02,09:00:07', // a problem row does not replace the earlier reading
  ];

  it('gives each row its coupon, in the file order and shuffled', async () => {
    const inOrder = byRow(await collect(lines));
    expect(inOrder.get(2)).toBe('BX-000');
    expect(inOrder.get(7)).toBe('BX-005 replaced by 42');
    expect(inOrder.get(42)).toBe('BX-005');
    expect(inOrder.get(43)).toBe('Mixed-7');
    expect(inOrder.get(44)).toBe('unknown-tag (ab-1 AB-1);');
    expect(inOrder.get(45)).toBe('ab-1');
    expect(inOrder.get(46)).toMatch(/^unknown-tag \(BX-001/);
    expect(inOrder.get(47)).toBe('CT-9');
    expect(inOrder.get(41)).toBe('BX-039 replaced by 48');
    expect(inOrder.get(49)).toBe('mass-not-a-number;');
    expect(inOrder.size).toBe(lines.length);

    // The same rows in other orders (a fixed linear congruential sequence, Numerical Recipes' constants): each
    // row, known by its content, gets what it got in order, but for which of two readings of a coupon comes later.
    let seed = 99;
    const next = () => (seed = (seed * 1664525 + 1013904223) >>> 0) / 2 ** 32;
    for (let k = 0; k < 5; k++) {
      const order = lines.map((line, i) => ({ line, i, key: next() })).sort((a, b) => a.key - b.key);
      const got = byRow(await collect(order.map((o) => o.line)));
      order.forEach((o, j) => {
        const want = (inOrder.get(o.i + 2) as string).replace(/ replaced by \d+$/, '');
        expect(got.get(j + 2)!.replace(/ replaced by \d+$/, ''), o.line).toBe(want);
      });
    }
  });

  it('explains every row of an unknown tag with the nearest known tags, found once the file is read', async () => {
    const c = await collect([
      'BX-0O1,12,2026-03-02,08:00:00',
      'BX-002,12,2026-03-02,08:00:01',
      'BX-0O1,13,2026-03-02,08:00:02',
      'QQQQQQQQ,1,2026-03-02,08:00:03',
    ]);
    expect(c.problems.map((p) => [p.row, p.code, p.message, p.suggestions])).toEqual([
      [2, 'unknown-tag', 'No coupon is tagged "BX-0O1"; did you mean BX-001, BX-011, BX-021?', ['BX-001', 'BX-011', 'BX-021']],
      [4, 'unknown-tag', 'No coupon is tagged "BX-0O1"; did you mean BX-001, BX-011, BX-021?', ['BX-001', 'BX-011', 'BX-021']],
      [5, 'unknown-tag', 'No coupon is tagged "QQQQQQQQ"', []],
    ]);
  });

  it('gives a sequence its coupons in the weighing order, a coupon listed twice being one coupon', async () => {
    const runId = Number(d.sqlite.prepare("insert into runs (code, chamber, altitude_m) values ('R-1', 'A', 0)").run().lastInsertRowid);
    const seq = [ids['BX-003']!, ids['BX-001']!, ids['BX-003']!];
    const c = await collect(['x,1,2026-03-02,08:00:00', 'y,2,2026-03-02,08:00:01', 'z,3,2026-03-02,08:00:02', 'w,4,2026-03-02,08:00:03'], {
      target: { mode: 'sequence', runId, couponIds: seq },
    });
    expect(c.coupon.map((k) => k.tag)).toEqual(['BX-003', 'BX-001', 'BX-003']);
    expect(c.replacedBy).toEqual([4, 0, 0]);
    expect(c.problems.map((p) => [p.row, p.code])).toEqual([[5, 'sequence-extra-reading']]);
  });
});
