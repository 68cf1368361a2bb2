import { describe, expect, it } from 'vitest';
import { importMappingSchema, type ImportMappingInput } from '../schemas/imports';
import { editDistance, editDistanceWithin, nearestTags, tagSearch } from './levenshtein';
import { readRow } from './rows';
import { shapeKey, templateCsv } from './template';
import { splitRows } from './format';

const base: ImportMappingInput = {
  format: { encoding: 'utf-8', delimiter: ',', hasHeader: true, decimal: '.', dateOrder: 'ymd' },
  target: { mode: 'tag', tagColumn: 0 },
  massColumn: 1,
  stage: 'dry',
};
const map = (over: Partial<ImportMappingInput> = {}) => importMappingSchema.parse({ ...base, ...over });
const ctx = { columnNames: ['Tag', 'Mass', 'Unit', 'Date', 'Time', 'Flag'], fallbackIso: '2026-03-05T08:00:00.000Z' };

describe('readRow', () => {
  it('reads a clean row into grams at the upload time when no date is mapped', () => {
    expect(readRow(['A-1', '12.5'], map(), ctx)).toEqual({ tag: 'A-1', massG: 12.5, measuredAt: ctx.fallbackIso, stable: null, problems: [] });
  });

  it('takes the unit from the reading, then the unit column, then the fixed unit', () => {
    expect(readRow(['A-1', '1 oz', 'lb'], map({ unitColumn: 2 }), ctx).massG).toBeCloseTo(28.349523125, 12);
    expect(readRow(['A-1', '1', 'lb'], map({ unitColumn: 2 }), ctx).massG).toBeCloseTo(453.59237, 12);
    expect(readRow(['A-1', '5'], map({ fixedUnit: 'ct' }), ctx).massG).toBeCloseTo(1, 12);
  });

  it('names the column of each problem', () => {
    const r = readRow(['', 'abc'], map(), ctx);
    expect(r.problems.map((p) => [p.code, p.column])).toEqual([
      ['no-tag', 'Tag'],
      ['mass-not-a-number', 'Mass'],
    ]);
    expect(readRow(['A-1', ''], map(), ctx).problems[0]).toMatchObject({ code: 'mass-empty', column: 'Mass' });
    expect(readRow(['A-1', '3', 'stone'], map({ unitColumn: 2 }), ctx).problems[0]).toMatchObject({ code: 'unknown-unit', column: 'Unit' });
    expect(readRow(['A-1', '-0.2 g'], map(), ctx).problems[0]).toMatchObject({ code: 'non-positive-mass', column: 'Mass' });
    expect(readRow(['A-1', '0'], map(), ctx).problems[0]).toMatchObject({ code: 'non-positive-mass' });
    expect(readRow(['A-1', 'OL'], map(), ctx).problems[0]).toMatchObject({ code: 'overload' });
  });

  it('leaves out unstable readings unless asked, from the reading or the flag column', () => {
    expect(readRow(['A-1', '12.5 g ?'], map(), ctx).problems[0]).toMatchObject({ code: 'unstable', column: 'Mass' });
    expect(readRow(['A-1', '12.5', '', '', '', 'US'], map({ stabilityColumn: 5 }), ctx).problems[0]).toMatchObject({ code: 'unstable', column: 'Flag' });
    expect(readRow(['A-1', '12.5 g ?'], map({ includeUnstable: true }), ctx).problems).toEqual([]);
  });

  it('reads a date and a time from two columns at the shop offset', () => {
    const m = map({ dateColumn: 3, timeColumn: 4, utcOffsetMinutes: 60, format: { ...base.format, dateOrder: 'dmy' } });
    expect(readRow(['A-1', '12', '', '02/03/2026', '10:30'], m, ctx).measuredAt).toBe('2026-03-02T09:30:00.000Z');
    expect(readRow(['A-1', '12', '', '31/02/2026', '10:30'], m, ctx).problems[0]).toMatchObject({ code: 'bad-date', column: 'Date' });
  });

  it('puts a time without a date on the day of the upload', () => {
    expect(readRow(['A-1', '12', '', '', '10:30'], map({ timeColumn: 4 }), ctx).measuredAt).toBe('2026-03-05T10:30:00.000Z');
  });

  it('needs no tag in sequence mode', () => {
    const r = readRow(['12.5'], map({ target: { mode: 'sequence', runId: 1, couponIds: [1] }, massColumn: 0 }), ctx);
    expect(r).toMatchObject({ tag: null, massG: 12.5, problems: [] });
  });

  it('refuses a correction without a reason', () => {
    expect(importMappingSchema.safeParse({ ...base, existing: 'correct' }).success).toBe(false);
    expect(importMappingSchema.safeParse({ ...base, existing: 'correct', correctionReason: 'scale recalibrated' }).success).toBe(true);
  });
});

describe('nearest tags', () => {
  it('computes edit distance (Levenshtein 1966; kitten → sitting is the textbook 3)', () => {
    expect(editDistance('kitten', 'sitting')).toBe(3);
    expect(editDistance('', 'abc')).toBe(3);
    expect(editDistance('abc', 'abc')).toBe(0);
  });

  it('suggests close tags only, nearest first', () => {
    const known = ['OAK-01', 'OAK-02', 'OAK-10', 'ASH-01', 'MAPLE-77'];
    // OAK-01 and OAK-10 are one edit away (tie broken by tag), OAK-02 two.
    expect(nearestTags('oak-1', known)).toEqual(['OAK-01', 'OAK-10', 'OAK-02']);
    expect(nearestTags('ZZZ-99', known)).toEqual([]);
    expect(tagSearch(known)('oak-1')).toEqual(['OAK-01', 'OAK-10', 'OAK-02']);
  });

  // A fixed linear congruential sequence (Numerical Recipes' constants): the same strings on every run.
  let seed = 8;
  const next = () => (seed = (seed * 1664525 + 1013904223) >>> 0) / 2 ** 32;
  const word = (alphabet: string, max: number) => {
    let w = '';
    for (let i = Math.floor(next() * (max + 1)); i > 0; i--) w += alphabet[Math.floor(next() * alphabet.length)];
    return w;
  };

  it('bounds the edit distance with the answers of the full one', () => {
    const wrong: string[] = [];
    for (let k = 0; k < 20_000; k++) {
      const a = word('ab-1', 12);
      const b = next() < 0.5 ? word('ab-1', 12) : a.slice(0, Math.floor(next() * a.length)) + word('ab1', 3) + a.slice(Math.floor(next() * a.length));
      const bound = Math.floor(next() * 6);
      const full = editDistance(a, b);
      if (editDistanceWithin(a, b, bound) !== (full <= bound ? full : bound + 1)) wrong.push(`${a} ${b} ${bound}`);
    }
    expect(wrong).toEqual([]);
  });

  it('searches a list of tags as nearestTags does', () => {
    const known = Array.from({ length: 400 }, () => `${word('ABox', 3)}-${word('0123456789', 4)}`);
    const search = tagSearch(known);
    for (let k = 0; k < 300; k++) {
      const tag = next() < 0.5 ? (known[Math.floor(next() * known.length)] as string).toLowerCase().replace(/.$/, 'x') : word('abOX-0123', 10);
      expect(search(tag), tag).toEqual(nearestTags(tag, known));
    }
  });
});

describe('template and shape', () => {
  it('offers a template that Lumenbook itself reads', () => {
    const rows = splitRows(templateCsv(), ',');
    const m = map({ unitColumn: 2, dateColumn: 3, timeColumn: 4, stabilityColumn: 5 });
    const read = rows.slice(1).map((r) => readRow(r, m, ctx));
    expect(read.every((r) => r.problems.length === 0 && r.massG !== null && r.stable === true)).toBe(true);
  });

  it('gives files of one shape one key', () => {
    expect(shapeKey([' Tag ', 'MASS'], ';', 2)).toBe(shapeKey(['tag', 'mass'], ';', 2));
    expect(shapeKey(['tag', 'mass'], ';', 2)).not.toBe(shapeKey(['tag', 'mass'], ',', 2));
    expect(shapeKey(null, '\t', 3)).toBe('tab|#3');
  });
});
