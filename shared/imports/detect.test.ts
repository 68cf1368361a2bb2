import fs from 'node:fs';
import path from 'node:path';
import iconv from 'iconv-lite';
import { describe, expect, it } from 'vitest';
import { detectSample } from './detect';
import { binaryReason, detectEncoding } from './encoding';

const dir = path.resolve(import.meta.dirname, '../../tests/fixtures/imports');
function detect(name: string) {
  const bytes = fs.readFileSync(path.join(dir, name));
  const enc = detectEncoding(bytes);
  const text = iconv.decode(bytes.subarray(enc.bomBytes), enc.encoding);
  return { enc, binary: binaryReason(bytes, enc.encoding), ...detectSample(text, enc, false) };
}

// Each fixture is a file of our own invention showing one quirk of what scales write.
describe('detection over the fixtures', () => {
  it.each([
    ['comma-header.csv', 'utf-8', ',', true, '.', 'ymd'],
    ['utf8-bom-semicolon-decimal-comma.csv', 'utf-8', ';', true, ',', 'dmy'],
    ['utf16le-bom-tab.txt', 'utf-16le', '\t', true, '.', 'ymd'],
    ['utf16be-bom-comma.csv', 'utf-16be', ',', true, '.', 'ymd'],
    ['windows-1252-semicolon.csv', 'windows-1252', ';', true, ',', 'ymd'],
    ['pipe-delimited.txt', 'utf-8', '|', true, '.', 'ymd'],
    ['spaces-printout.txt', 'utf-8', 'spaces', false, '.', 'ymd'],
    ['no-header.csv', 'utf-8', ',', false, '.', 'ymd'],
    ['two-date-columns-day-first.csv', 'utf-8', ',', true, '.', 'dmy'],
    ['one-date-column-month-first.csv', 'utf-8', ',', true, '.', 'mdy'],
    ['ambiguous-dates.csv', 'utf-8', ',', true, '.', 'dmy'],
    ['demo-run-cured.csv', 'utf-8', ';', true, ',', 'dmy'],
  ] as const)('%s: %s, %j, header %s, decimal %j, dates %s', (name, encoding, delimiter, hasHeader, decimal, order) => {
    const d = detect(name);
    expect(d.binary).toBeNull();
    expect(d.detected.encoding.value).toBe(encoding);
    expect(d.detected.delimiter.value).toBe(delimiter);
    expect(d.detected.hasHeader.value).toBe(hasHeader);
    expect(d.detected.decimal.value).toBe(decimal);
    expect(d.detected.dateOrder.value).toBe(order);
  });

  it('reads Windows-1252 letters right', () => {
    const d = detect('windows-1252-semicolon.csv');
    expect(d.view.header?.[0]).toBe('Étiquette');
    expect(d.view.sampleRows[1]?.[3]).toBe('nœud près du bout');
    expect(d.view.sampleRows[2]?.[3]).toBe('coût €0');
  });

  it('suggests the columns of a printout with flags and readings', () => {
    const d = detect('spaces-printout.txt');
    expect(d.view.sampleRows[0]).toEqual(['2026-03-02', '09:15:00', 'FX-01', 'ST', '+12.345 g']);
    expect(d.detected.suggested).toMatchObject({ dateColumn: 0, timeColumn: 1, tagColumn: 2, stabilityColumn: 3, massColumn: 4 });
    expect(d.detected.unitInReading).toBe('g');
  });

  it('finds flags inside readings', () => {
    const d = detect('stability-in-reading.txt');
    expect(d.detected.stabilityInReading).toBe(true);
  });

  it('says why it assumed day-first for dates that read both ways', () => {
    const d = detect('ambiguous-dates.csv');
    expect(d.detected.dateOrder).toMatchObject({ assumed: true });
    expect(d.detected.dateOrder.reason).toMatch(/run forward in time/);
    expect(detect('demo-run-cured.csv').detected.dateOrder.reason).toMatch(/dots/);
  });

  it('tells a binary file and an empty one', () => {
    expect(detect('binary.csv').binary).toMatch(/PNG/);
    expect(detect('empty.csv').view.rows).toEqual([]);
    const h = detect('header-only.csv');
    expect(h.detected.hasHeader.value).toBe(true);
    expect(h.view.rows).toEqual([]);
  });
});
