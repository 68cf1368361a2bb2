/**
 * The one reader of numbers typed by a person, in every form and the entry grid.
 *
 * - empty (or only spaces) → `null`: not given, never zero;
 * - a decimal point or a decimal comma: `12.5` and `12,5` are both twelve and a half (a bench scale, a
 *   spreadsheet or a European keyboard may give either);
 * - spaces (also no-break and thin spaces) and apostrophes group thousands: `1 234,5`, `1'234.5`;
 * - with both a point and a comma, the last one is the decimal mark and the other groups thousands:
 *   `1,234.5` and `1.234,5` are both 1234.5; several of the same mark group thousands: `1,234,567`;
 * - an exponent is accepted (`1.2e-3`); anything else (letters, two decimal marks, `Infinity`, hex) → `NaN`,
 *   so the form can say "Enter a number" on the field.
 *
 * A single comma followed by exactly three digits (`1,234`) is read as a decimal comma (1.234): at the
 * bench, decimals are typed far more often than thousands, and a mass of 1.234 g read as 1234 g would be
 * refused anyway by the plausibility checks, while the opposite mistake would pass silently.
 */
export function parseNumber(input: string | number | null | undefined): number | null {
  if (input === null || input === undefined) return null;
  if (typeof input === 'number') return Number.isFinite(input) ? input : Number.NaN;
  let s = input.replace(/[\s\u00a0\u202f']/g, '');
  if (s === '') return null;
  const lastComma = s.lastIndexOf(',');
  const lastPoint = s.lastIndexOf('.');
  if (lastComma >= 0 && lastPoint >= 0) {
    const decimal = lastComma > lastPoint ? ',' : '.';
    const group = decimal === ',' ? '.' : ',';
    const [whole = '', frac, ...more] = s.split(decimal);
    if (more.length > 0 || frac === undefined || !groupedThousands(whole, group)) return Number.NaN;
    s = `${whole.split(group).join('')}.${frac}`;
  } else if (lastComma >= 0) {
    const parts = s.split(',');
    if (parts.length === 2) s = parts.join('.');
    else if (groupedThousands(s, ',')) s = parts.join('');
    else return Number.NaN;
  } else if (s.split('.').length > 2) {
    if (!groupedThousands(s, '.')) return Number.NaN;
    s = s.split('.').join('');
  }
  if (!/^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(s)) return Number.NaN;
  return Number(s);
}

/** `1,234,567` with `,`: the first group has 1–3 digits, the others exactly 3. */
function groupedThousands(s: string, mark: string): boolean {
  const groups = s.replace(/^[+-]/, '').split(mark);
  return groups.length > 1 && /^\d{1,3}$/.test(groups[0] ?? '') && groups.slice(1).every((g) => /^\d{3}$/.test(g));
}

/** What a number box says when its text is not a number. */
export const NOT_A_NUMBER = 'Enter a number, e.g. 12.5 or 12,5';
