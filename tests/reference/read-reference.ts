// Test-only readers for the published reference files in this folder (Node APIs are fine here).
// Paths are relative to this folder, e.g. './nist-strd/Norris.dat'.
import { readFileSync } from 'node:fs';

function readText(relativePath: string): string {
  return readFileSync(new URL(relativePath, import.meta.url), 'utf8');
}

/** Splits one CSV line, honouring double-quoted fields (no embedded newlines in these files). */
function splitCsvLine(line: string): string[] {
  const out: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i];
    if (quoted) {
      if (c === '"' && line[i + 1] === '"') {
        field += '"';
        i++;
      } else if (c === '"') quoted = false;
      else field += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') {
      out.push(field);
      field = '';
    } else field += c;
  }
  out.push(field);
  return out;
}

/** Rows of a reference CSV as records keyed by the header; `#` lines are provenance comments. */
export function readReferenceCsv(relativePath: string): Record<string, string>[] {
  const lines = readText(relativePath)
    .split(/\r?\n/)
    .filter((l) => l.trim() !== '' && !l.startsWith('#'));
  const [header, ...body] = lines;
  if (header === undefined) throw new Error(`${relativePath} has no header`);
  const names = splitCsvLine(header);
  return body.map((line) => {
    const cells = splitCsvLine(line);
    return Object.fromEntries(names.map((name, i) => [name, cells[i] ?? '']));
  });
}

/**
 * Numeric data rows of a NIST StRD .dat file: every all-numeric line after the last line that starts
 * with "Data:". Accepts LF or CRLF, since NIST's server and git copies differ.
 */
export function readNistData(relativePath: string): number[][] {
  const lines = readText(relativePath).split(/\r?\n/);
  let start = -1;
  lines.forEach((l, i) => {
    if (l.startsWith('Data:')) start = i;
  });
  if (start < 0) throw new Error(`${relativePath} has no Data: section`);
  return lines
    .slice(start + 1)
    .map((l) => l.trim())
    .filter((l) => /^[-+0-9.eE\s]+$/.test(l) && /[0-9]/.test(l))
    .map((l) => l.split(/\s+/).map(Number));
}
