import type { ImportProblemCode } from '../constants/imports';
import type { ImportMapping } from '../schemas/imports';
import { readingInstant } from './dates';
import { readMassUnit, toGrams, type ImportMassUnit } from './mass-units';
import { parseReading, readStabilityFlag } from './reading';

export interface RowProblem {
  code: ImportProblemCode;
  /** The column's name as the file has it (or "Column n"), null for a problem of the whole row. */
  column: string | null;
  message: string;
}

/** One file row read through a mapping, before any coupon is looked up. */
export interface RowReading {
  tag: string | null;
  massG: number | null;
  measuredAt: string | null;
  stable: boolean | null;
  problems: RowProblem[];
}

export interface RowContext {
  columnNames: string[];
  /** The time given to readings when the file has no date: the upload's. ISO. */
  fallbackIso: string;
}

const cell = (cells: string[], i: number | null) => (i === null ? '' : (cells[i] ?? '').trim());
const nameOf = (ctx: RowContext, i: number) => ctx.columnNames[i] ?? `Column ${i + 1}`;

/**
 * Reads one row: tag (in tag mode), mass in grams from the reading and its unit (the reading's own
 * unit first, then the unit column, then the mapping's fixed unit), time from one or two columns,
 * stability from the reading and the stability column (unstable if either says so). Every problem found
 * is listed, each with its column; the coupon-dependent checks come later, on the server.
 */
export function readRow(cells: string[], mapping: ImportMapping, ctx: RowContext): RowReading {
  const problems: RowProblem[] = [];
  let tag: string | null = null;
  if (mapping.target.mode === 'tag') {
    tag = cell(cells, mapping.target.tagColumn) || null;
    if (!tag) problems.push({ code: 'no-tag', column: nameOf(ctx, mapping.target.tagColumn), message: 'No coupon tag in this row' });
  }

  const massCol = nameOf(ctx, mapping.massColumn);
  const raw = cell(cells, mapping.massColumn);
  const reading = parseReading(raw, mapping.format.decimal);
  let massG: number | null = null;
  let stable: boolean | null = null;
  if (!reading.ok) {
    const code: ImportProblemCode =
      reading.reason === 'empty'
        ? 'mass-empty'
        : reading.reason === 'unknown-unit'
          ? 'unknown-unit'
          : reading.reason === 'overload'
            ? 'overload'
            : 'mass-not-a-number';
    problems.push({ code, column: massCol, message: reading.reason === 'empty' ? 'No mass in this row' : reading.message });
  } else {
    stable = reading.stable;
    let unit: ImportMassUnit | null = reading.unit;
    if (!unit && mapping.unitColumn !== null) {
      const u = cell(cells, mapping.unitColumn);
      unit = u ? readMassUnit(u) : mapping.fixedUnit;
      if (!unit)
        problems.push({
          code: 'unknown-unit',
          column: nameOf(ctx, mapping.unitColumn),
          message: `"${u.slice(0, 20)}" is not a mass unit Lumenbook knows (g, kg, oz, lb, ct, dwt)`,
        });
    } else unit ??= mapping.fixedUnit;
    if (unit) {
      const g = toGrams(reading.value, unit);
      if (!(g > 0)) problems.push({ code: 'non-positive-mass', column: massCol, message: `A mass must be greater than zero; the row says ${raw}` });
      else massG = g;
    }
  }
  if (mapping.stabilityColumn !== null) {
    const flag = readStabilityFlag(cell(cells, mapping.stabilityColumn));
    if (flag !== null) stable = stable === null ? flag : stable && flag;
  }
  if (stable === false && !mapping.includeUnstable) {
    const col = mapping.stabilityColumn !== null ? nameOf(ctx, mapping.stabilityColumn) : massCol;
    problems.push({ code: 'unstable', column: col, message: 'The balance marked this reading unstable; it is left out unless you include unstable readings' });
  }

  let measuredAt: string | null = ctx.fallbackIso;
  if (mapping.dateColumn !== null) {
    const d = cell(cells, mapping.dateColumn);
    const t = mapping.timeColumn === null ? null : cell(cells, mapping.timeColumn);
    const iso = d ? readingInstant(d, t, mapping.format.dateOrder, mapping.utcOffsetMinutes) : null;
    if (iso === null) {
      const col = nameOf(ctx, mapping.dateColumn);
      const what = d
        ? `"${d.slice(0, 30)}${t ? ` ${t.slice(0, 20)}` : ''}" is not a date and time that can be read ${ORDER_WORDS[mapping.format.dateOrder]}`
        : 'No date in this row';
      problems.push({ code: 'bad-date', column: col, message: what });
      measuredAt = null;
    } else measuredAt = iso;
  } else if (mapping.timeColumn !== null) {
    // A time without a date: the day of the upload.
    const t = cell(cells, mapping.timeColumn);
    const day = ctx.fallbackIso.slice(0, 10);
    const iso = t ? readingInstant(day, t, 'ymd', mapping.utcOffsetMinutes) : null;
    if (iso === null) {
      problems.push({
        code: 'bad-date',
        column: nameOf(ctx, mapping.timeColumn),
        message: t ? `"${t.slice(0, 20)}" is not a time of day` : 'No time in this row',
      });
      measuredAt = null;
    } else measuredAt = iso;
  }
  return { tag, massG, measuredAt, stable, problems };
}

const ORDER_WORDS = { ymd: 'year first', dmy: 'day first', mdy: 'month first' } as const;
