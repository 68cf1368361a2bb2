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
