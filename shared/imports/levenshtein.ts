/**
 * Edit distance (insertions, deletions, substitutions each cost 1), the classic dynamic programme
 * with one row of memory. Used to suggest the nearest known tags for a tag that matches none.
 */
export function editDistance(a: string, b: string): number {
  if (a === b) return 0;
  if (a.length === 0) return b.length;
  if (b.length === 0) return a.length;
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const cur = [i];
    for (let j = 1; j <= b.length; j++) {
      const sub = (prev[j - 1] as number) + (a[i - 1] === b[j - 1] ? 0 : 1);
      cur.push(Math.min(sub, (prev[j] as number) + 1, (cur[j - 1] as number) + 1));
    }
    prev = cur;
  }
  return prev[b.length] as number;
}

/**
 * Up to `limit` known tags closest to `tag` (case-insensitive), nearest first, ties by tag; only those
 * within a distance of max(2, a third of the tag's length), so a wild guess is never offered.
 */
export function nearestTags(tag: string, known: Iterable<string>, limit = 3): string[] {
  const t = tag.trim().toUpperCase();
  const bound = Math.max(2, Math.floor(t.length / 3));
  const scored: { tag: string; d: number }[] = [];
  for (const k of known) {
    if (Math.abs(k.length - t.length) > bound) continue;
    const d = editDistance(t, k.toUpperCase());
    if (d <= bound) scored.push({ tag: k, d });
  }
  scored.sort((x, y) => x.d - y.d || x.tag.localeCompare(y.tag));
  return scored.slice(0, limit).map((s) => s.tag);
}

/** Rows of the banded edit distance, grown as longer tags come (one search runs over 100,000 tags). */
let prevRow = new Int32Array(64);
let curRow = new Int32Array(64);

/**
 * editDistance(a, b) when it is at most `bound`, else bound + 1: the same dynamic programme kept to the
 * diagonal band |i − j| ≤ bound (a cell outside it is already above the bound) and stopped once a whole row
 * is above it (Ukkonen, "Algorithms for approximate string matching", Information and Control 64, 1985),
 * after dropping the common prefix and suffix.
 * No allocation per call. rows.test.ts compares it with editDistance.
 */
export function editDistanceWithin(a: string, b: string, bound: number): number {
  const over = bound + 1;
  if (Math.abs(a.length - b.length) > bound) return over;
  if (a === b) return 0;
  // A common prefix and suffix change no distance: the programme runs on what lies between.
  let start = 0;
  let endA = a.length;
  let endB = b.length;
  while (start < endA && start < endB && a.charCodeAt(start) === b.charCodeAt(start)) start++;
  while (endA > start && endB > start && a.charCodeAt(endA - 1) === b.charCodeAt(endB - 1)) {
    endA--;
    endB--;
  }
  const n = endA - start;
  const m = endB - start;
  if (n === 0 || m === 0) return Math.max(n, m);
  if (m + 1 > prevRow.length) {
    prevRow = new Int32Array(2 * (m + 1));
    curRow = new Int32Array(2 * (m + 1));
  }
  let prev = prevRow;
  let cur = curRow;
  for (let j = 0; j <= m; j++) prev[j] = j <= bound ? j : over;
  for (let i = 1; i <= n; i++) {
    const from = Math.max(1, i - bound);
    const to = Math.min(m, i + bound);
    cur[0] = i <= bound ? i : over;
    if (from > 1) cur[from - 1] = over;
    let best = cur[0] as number;
    const ac = a.charCodeAt(start + i - 1);
    for (let j = from; j <= to; j++) {
      const sub = (prev[j - 1] as number) + (ac === b.charCodeAt(start + j - 1) ? 0 : 1);
      const del = (prev[j] as number) + 1;
      const ins = (cur[j - 1] as number) + 1;
      let v = sub < del ? sub : del;
      if (ins < v) v = ins;
      if (v > over) v = over;
      cur[j] = v;
      if (v < best) best = v;
    }
    if (to < m) cur[to + 1] = over;
    if (best > bound) return over;
    const t = prev;
    prev = cur;
    cur = t;
  }
  const d = prev[m] as number;
  return d > bound ? over : d;
}

/**
 * nearestTags over one list of known tags, searched many times (a file's unknown tags against every
 * coupon): the tags are upper-cased once, and each distance is the banded one. The same answers as
 * nearestTags (rows.test.ts), at a few ms rather than ~150 ms per search over 100,000 tags.
 */
export function tagSearch(known: readonly string[]): (tag: string, limit?: number) => string[] {
  const upper = known.map((k) => k.toUpperCase());
  return (tag, limit = 3) => {
    const t = tag.trim().toUpperCase();
    const bound = Math.max(2, Math.floor(t.length / 3));
    const scored: { tag: string; d: number }[] = [];
    for (let i = 0; i < upper.length; i++) {
      const u = upper[i] as string;
      if (Math.abs(u.length - t.length) > bound) continue;
      const d = editDistanceWithin(t, u, bound);
      if (d <= bound) scored.push({ tag: known[i] as string, d });
    }
    scored.sort((x, y) => x.d - y.d || x.tag.localeCompare(y.tag));
    return scored.slice(0, limit).map((s) => s.tag);
  };
}
