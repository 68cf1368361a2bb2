/**
 * Coupon tags, a scheme of our own that reads aloud at the bench and sorts sensibly:
 *
 *   treated  <trial code>-<species code>-<resin code>-<nn>    e.g. T26-004-RMA-CP90-03
 *   control  <trial code>-<species code>-C<nn>                e.g. T26-004-RMA-C02
 *
 * Trial codes are T<two-digit year>-<three-digit counter within the year>. Species and resin codes are
 * short upper-case abbreviations, unique within one trial; numbers run on per species × resin (so two
 * process settings of the same cell share one sequence) and per species for controls.
 */

export const TRIAL_CODE_PATTERN = /^T(\d{2})-(\d{3,})$/;

export function trialCode(year: number, counter: number): string {
  return `T${String(year % 100).padStart(2, '0')}-${String(counter).padStart(3, '0')}`;
}

/** The counter of a trial code of the given year, or null when the code belongs to another year. */
export function trialCounter(code: string, year: number): number | null {
  const m = TRIAL_CODE_PATTERN.exec(code);
  if (!m || Number(m[1]) !== year % 100) return null;
  return Number(m[2]);
}

function words(name: string): string[] {
  return name
    .normalize('NFKD')
    .replace(/[^\p{L}\p{N}\s,-]/gu, '')
    .split(/[\s,-]+/)
    .filter((w) => w.length > 0);
}

/**
 * "Maple, red" → "RMA", "Box elder" → "BEL", "Sweetgum" → "SWE", "Box elder burl, spalted" → "SBEBU".
 * A handbook-style name "Head, qualifier" is read as "qualifier head", then each word but the last
 * gives its initial and the last (the head noun) gives two letters.
 */
export function speciesCode(commonName: string): string {
  const [head, ...rest] = commonName.split(',');
  const ordered = words([...rest, head ?? ''].join(' '));
  if (ordered.length === 0) return 'SP';
  const last = ordered[ordered.length - 1]!;
  const code =
    ordered.length === 1
      ? last.slice(0, 3)
      : ordered
          .slice(0, -1)
          .slice(0, 3)
          .map((w) => w[0])
          .join('') + last.slice(0, 2);
  return code.toUpperCase().slice(0, 5);
}

/** "Crystal Pane 90" → "CP90", "Ember Pane 90 (dyed)" → "EPD90", "Glassmere" → "GLA". Numbers stay whole. */
export function resinCode(name: string): string {
  const ws = words(name);
  if (ws.length === 0) return 'RS';
  const letters = ws.filter((w) => !/^\d+$/.test(w));
  const numbers = ws.filter((w) => /^\d+$/.test(w));
  const code =
    ws.length === 1
      ? ws[0]!.slice(0, 3)
      : letters
          .map((w) => w[0])
          .join('')
          .slice(0, 3) + numbers.join('');
  return code.toUpperCase().slice(0, 6);
}

/**
 * Gives every id a code unique among `ids`, keeping the codes already in use (recovered from existing
 * tags) so that tags stay stable when a trial grows; a clash gets a digit suffix (RMA, RMA2, RMA3).
 */
export function assignCodes(
  items: readonly { id: number; name: string }[],
  existing: ReadonlyMap<number, string>,
  makeCode: (name: string) => string,
): Map<number, string> {
  const out = new Map<number, string>();
  const used = new Set<string>();
  for (const item of items) {
    const code = existing.get(item.id);
    if (code !== undefined) {
      out.set(item.id, code);
      used.add(code);
    }
  }
  for (const item of [...items].sort((a, b) => a.id - b.id)) {
    if (out.has(item.id)) continue;
    const base = makeCode(item.name);
    let code = base;
    for (let n = 2; used.has(code); n++) code = `${base}${n}`;
    out.set(item.id, code);
    used.add(code);
  }
  return out;
}

const nn = (n: number) => String(n).padStart(2, '0');

export function treatedTag(trial: string, species: string, resin: string, n: number): string {
  return `${trial}-${species}-${resin}-${nn(n)}`;
}

export function controlTag(trial: string, species: string, n: number): string {
  return `${trial}-${species}-C${nn(n)}`;
}

export type ParsedTag = { role: 'treated'; species: string; resin: string; n: number } | { role: 'control'; species: string; n: number };

/** Reads a tag of this scheme back; null for a tag of another trial or another scheme. */
export function parseTag(trial: string, tag: string): ParsedTag | null {
  if (!tag.startsWith(`${trial}-`)) return null;
  const parts = tag.slice(trial.length + 1).split('-');
  if (parts.length === 2) {
    const m = /^C(\d+)$/.exec(parts[1]!);
    return m && parts[0] ? { role: 'control', species: parts[0], n: Number(m[1]) } : null;
  }
  if (parts.length === 3 && /^\d+$/.test(parts[2]!) && parts[0] && parts[1]) {
    return { role: 'treated', species: parts[0], resin: parts[1], n: Number(parts[2]) };
  }
  return null;
}
