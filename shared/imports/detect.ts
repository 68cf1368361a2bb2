import type { ImportDetected, ImportFormat } from '../schemas/imports';
import { inferDateOrder, type DateOrderGuess } from './dates';
import type { EncodingGuess } from './encoding';
import {
  detectDecimal,
  detectDelimiter,
  detectHeader,
  detectLineEnding,
  guessColumns,
  splitRows,
  suggestColumns,
  type ColumnGuess,
  type KnownTags,
} from './format';
import type { ImportMassUnit } from './mass-units';
import { parseReading } from './reading';

/** Rows of the sample shown to the user beside the mapping. */
export const SAMPLE_ROWS = 20;

export interface SampleView {
  header: string[] | null;
  columns: ColumnGuess[];
  /** Data rows of the sample (header excluded), at most SAMPLE_ROWS. */
  sampleRows: string[][];
  /** All data rows of the sample, for the detection. */
  rows: string[][];
}

/** The sample's lines; a sample cut from a longer file loses its last, probably partial, line. */
export function sampleLines(text: string, truncated: boolean): string[] {
  const lines = text.split(/\r\n|\n|\r/);
  if (truncated && lines.length > 1) lines.pop();
  while (lines.length && lines[lines.length - 1]?.trim() === '') lines.pop();
  return lines;
}

/** The sample read with a given format (detected or chosen by the user). */
export function viewSample(lines: string[], format: Pick<ImportFormat, 'delimiter' | 'hasHeader' | 'decimal'>, knownTags?: KnownTags): SampleView {
  const all = splitRows(lines.join('\n'), format.delimiter);
  const header = format.hasHeader ? (all[0] ?? null) : null;
  const rows = format.hasHeader ? all.slice(1) : all;
  return { header, columns: guessColumns(header, rows, format.decimal, knownTags), sampleRows: rows.slice(0, SAMPLE_ROWS), rows };
}

/** The order of day and month, from the mapped date (and time) columns of the sample. */
export function dateOrderOf(rows: string[][], dateColumn: number | null, timeColumn: number | null, decimalComma: boolean): DateOrderGuess {
  if (dateColumn === null)
    return { order: 'ymd', assumed: true, reason: 'No date column was found; the readings take the time of the upload unless you map one' };
  const samples = rows
    .map((r) => ({ date: r[dateColumn] ?? '', time: timeColumn === null ? null : (r[timeColumn] ?? null) }))
    .filter((s) => s.date.trim() !== '');
  return inferDateOrder(samples, { decimalComma });
}

/**
 * Everything detection finds in a decoded sample of the file, each choice with its reason, plus the
 * sample as read with those choices.
 */
export function detectSample(
  text: string,
  encoding: EncodingGuess,
  truncated: boolean,
  knownTags?: KnownTags,
): { detected: ImportDetected; view: SampleView; lines: string[] } {
  const lines = sampleLines(text, truncated);
  const delimiter = detectDelimiter(lines);
  const firstRows = splitRows(lines.slice(0, 200).join('\n'), delimiter.delimiter);
  const decimal = detectDecimal(firstRows);
  const header = detectHeader(firstRows, decimal.decimal);
  const view = viewSample(lines, { delimiter: delimiter.delimiter, hasHeader: header.hasHeader, decimal: decimal.decimal }, knownTags);
  const suggested = suggestColumns(view.columns);
  const dateOrder = dateOrderOf(view.rows, suggested.dateColumn, suggested.timeColumn, decimal.decimal === ',');

  let unitInReading: ImportMassUnit | null = null;
  let stabilityInReading = false;
  if (suggested.massColumn !== null) {
    const units = new Set<ImportMassUnit | null>();
    for (const r of view.rows.slice(0, 200)) {
      const p = parseReading(r[suggested.massColumn] ?? '', decimal.decimal);
      if (!p.ok) continue;
      units.add(p.unit);
      if (p.stable !== null) stabilityInReading = true;
    }
    if (units.size === 1) unitInReading = [...units][0] ?? null;
  }
  const detected: ImportDetected = {
    encoding: { value: encoding.encoding, reason: encoding.reason, assumed: encoding.bomBytes === 0 && encoding.encoding === 'windows-1252' },
    delimiter: { value: delimiter.delimiter, reason: delimiter.reason, assumed: delimiter.columns < 2 },
    hasHeader: { value: header.hasHeader, reason: header.reason, assumed: false },
    decimal: { value: decimal.decimal, reason: decimal.reason, assumed: decimal.reason.includes('assumed') },
    dateOrder: { value: dateOrder.order, reason: dateOrder.reason, assumed: dateOrder.assumed },
    lineEnding: detectLineEnding(text),
    suggested,
    unitInReading,
    stabilityInReading,
  };
  return { detected, view, lines };
}

/** The detected choices as a format the user can change. */
export function formatOf(d: ImportDetected): ImportFormat {
  return { encoding: d.encoding.value, delimiter: d.delimiter.value, hasHeader: d.hasHeader.value, decimal: d.decimal.value, dateOrder: d.dateOrder.value };
}
