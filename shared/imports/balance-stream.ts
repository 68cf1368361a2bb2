import { toGrams, type ImportMassUnit } from './mass-units';
import { parseReading, type DecimalMark } from './reading';

/**
 * A balance on a serial port (a USB-serial cable) sends its readings as lines of text, one per print or,
 * in continuous mode, several a second. These pure pieces turn that stream into masses with the same
 * reading parser the file import uses; the browser adapter (src/lib/balance) only moves bytes.
 */

/** Longest line kept. Balance lines are tens of characters; a stream with no line ends is not a balance. */
export const MAX_BALANCE_LINE = 200;

/**
 * Splits text as it arrives into lines. CR, LF or CR LF end a line (balances use all three; common
 * practice), a line split across two chunks is joined, and a CR at the end of one chunk followed by an LF
 * at the start of the next ends one line, not two.
 */
export class LineSplitter {
  private rest = '';
  private afterCr = false;
  private dropping = false;
  /** Lines dropped because they ran past MAX_BALANCE_LINE. */
  overlong = 0;

  push(chunk: string): string[] {
    const lines: string[] = [];
    for (const ch of chunk) {
      if (ch === '\n' && this.afterCr) {
        this.afterCr = false;
        continue;
      }
      this.afterCr = ch === '\r';
      if (ch === '\r' || ch === '\n') {
        if (!this.dropping) lines.push(this.rest);
        this.rest = '';
        this.dropping = false;
      } else if (this.dropping) {
        continue;
      } else if (this.rest.length >= MAX_BALANCE_LINE) {
        // A run-on line is dropped whole; the next line end starts afresh.
        this.dropping = true;
        this.overlong++;
        this.rest = '';
      } else {
        this.rest += ch;
      }
    }
    return lines;
  }
}

export interface BalanceSettings {
  decimal: DecimalMark;
  /** The unit of a reading printed without one (the balance's display unit). */
  unitWhenNone: ImportMassUnit;
}

export type BalanceLine =
  /** A settled reading to write: grams, and the reading as the balance printed it. */
  | { kind: 'mass'; grams: number; printed: string }
  /** A reading the balance marked as still settling: wait for the next one. */
  | { kind: 'unstable'; printed: string }
  /** Nothing to do (a blank line between prints). */
  | { kind: 'blank' }
  /** A line that is not a usable mass, with the reason in words. */
  | { kind: 'refused'; printed: string; why: string };

/**
 * What one line from the balance means. A reading the balance marks unstable is never taken; a reading
 * with no flag is taken, because balances that print on a key press send settled readings only (common
 * practice). Zero and negative masses are refused: no coupon weighs nothing, and a negative reading is a
 * tare left on the pan.
 */
export function readBalanceLine(line: string, settings: BalanceSettings): BalanceLine {
  const printed = line.trim();
  if (printed === '') return { kind: 'blank' };
  const r = parseReading(printed, settings.decimal);
  if (!r.ok) return { kind: 'refused', printed, why: r.message };
  if (r.stable === false) return { kind: 'unstable', printed };
  if (r.value <= 0)
    return { kind: 'refused', printed, why: r.value === 0 ? 'The balance read 0: nothing on the pan' : 'A negative mass: is a tare left on the pan?' };
  return { kind: 'mass', grams: toGrams(r.value, r.unit ?? settings.unitWhenNone), printed };
}
