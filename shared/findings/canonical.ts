/**
 * Canonical JSON for signatures: the same content always gives the same bytes, so its SHA-256 can be
 * recomputed later and compared.
 *
 * The form follows RFC 8785 (JSON Canonicalization Scheme), with two additions of ours:
 * - object keys sorted by UTF-16 code units (RFC 8785 §3.2.3), no whitespace, recursively;
 * - numbers written as ECMAScript writes them (shortest round-trip form, RFC 8785 §3.2.2.3); NaN and
 *   infinities are refused;
 * - strings escaped as JSON.stringify does (RFC 8785 §3.2.2.2);
 * - array order kept (evidence and lists are ordered by the caller);
 * - keys whose value is `undefined` dropped; `null` kept;
 * - additions: every string value normalised to Unicode NFC, and CR LF / lone CR turned into LF, so a
 *   text that only looks different in its encoding or line endings hashes the same. Keys are left as
 *   they are (they are our own field names; NFC would reorder some, e.g. U+FB33 decomposes).
 */
export function canonicalJson(value: unknown): string {
  return write(value, '$');
}

function normalise(s: string): string {
  return s.replace(/\r\n?/g, '\n').normalize('NFC');
}

function write(value: unknown, path: string): string {
  if (value === null) return 'null';
  switch (typeof value) {
    case 'boolean':
      return value ? 'true' : 'false';
    case 'number':
      if (!Number.isFinite(value)) throw new TypeError(`Cannot sign a non-finite number at ${path}`);
      return JSON.stringify(value);
    case 'string':
      return JSON.stringify(normalise(value));
    case 'object': {
      if (Array.isArray(value)) return `[${value.map((v, i) => (v === undefined ? 'null' : write(v, `${path}[${i}]`))).join(',')}]`;
      const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined);
      // Default sort compares UTF-16 code units, which is what RFC 8785 asks for.
      entries.sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
      return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${write(v, `${path}.${k}`)}`).join(',')}}`;
    }
    default:
      throw new TypeError(`Cannot sign a ${typeof value} at ${path}`);
  }
}

/**
 * The field paths where two canonical values differ, for "altered: what differs". Objects are compared
 * key by key, arrays item by item; the paths read like `evidence[1].snapshot.numbers`.
 */
export function differences(expected: unknown, actual: unknown, path = ''): string[] {
  if (canonicalJson(expected ?? null) === canonicalJson(actual ?? null)) return [];
  const isObj = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
  if (Array.isArray(expected) && Array.isArray(actual)) {
    if (expected.length !== actual.length) return [path || '(root)'];
    return expected.flatMap((e, i) => differences(e, actual[i], `${path}[${i}]`));
  }
  if (isObj(expected) && isObj(actual)) {
    const keys = [...new Set([...Object.keys(expected), ...Object.keys(actual)])].sort();
    return keys.flatMap((k) => differences(expected[k], actual[k], path ? `${path}.${k}` : k));
  }
  return [path || '(root)'];
}
