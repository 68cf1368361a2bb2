import fs from 'node:fs';
import path from 'node:path';

/** bench/compare-results.md: each Compare bench rewrites its own section and leaves the others. */
const FILE = path.join(import.meta.dirname, 'compare-results.md');

const HEADER = `# Compare: benchmark results

Written by \`npx tsx bench/compare-server.ts\` (server section) and \`npm run build && npx tsx bench/compare-render.ts\`
(client section). The machine is shared (2 cores, other engineers' tests and builds): each section records
\`uptime\` beside its figures; CPU and renderer busy times hold better under load than wall-clock times.
`;

export function writeSection(name: string, body: string): void {
  const start = `<!-- ${name}:start -->`;
  const end = `<!-- ${name}:end -->`;
  let text = fs.existsSync(FILE) ? fs.readFileSync(FILE, 'utf8') : HEADER;
  const block = `${start}\n${body}\n${end}`;
  const a = text.indexOf(start);
  const b = text.indexOf(end);
  text = a >= 0 && b > a ? text.slice(0, a) + block + text.slice(b + end.length) : `${text.trimEnd()}\n\n${block}\n`;
  fs.writeFileSync(FILE, text);
}
