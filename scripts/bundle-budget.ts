// The bundle budget: how much JavaScript (gzip) the browser must fetch before a screen can show, built
// the way production builds it. Fails (exit 1) when a budget is exceeded or when a heavy library
// (statistics, plots, Markdown) reaches a screen that does not use it. Part of `npm run bench`.
//
//   npx tsx scripts/bundle-budget.ts          (builds into a temporary folder; dist/ is left alone)
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { build, type Manifest } from 'vite';

interface Budget {
  screen: string;
  /** The lazily loaded modules that the screen's first visit fetches besides the entry (layout, route). */
  modules: string[];
  maxGzipKb: number;
}

// Why sign-in is 160 and not 150: docs/decisions/0014-bundle-budgets.md (the libraries alone weigh 147).
const BUDGETS: Budget[] = [
  { screen: 'sign-in', modules: ['src/features/auth/routes/sign-in-route.tsx'], maxGzipKb: 160 },
  { screen: 'Bench', modules: ['src/app/layout.tsx', 'src/features/runs/routes/bench-route.tsx'], maxGzipKb: 250 },
];

/** Libraries only the analysis, findings and wiki screens need. */
const HEAVY =
  /node_modules\/(jstat|simple-statistics|ml-matrix|ml-regression[\w-]*|@observablehq\/plot|d3[\w-]*|marked|markdown-it|micromark[\w-]*|mdast[\w-]*|remark[\w-]*|dompurify|isomorphic-dompurify)\//;

const outDir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-budget-'));
try {
  await build({ logLevel: 'warn', build: { outDir, emptyOutDir: true, manifest: true, sourcemap: true } });
  const manifest = JSON.parse(fs.readFileSync(path.join(outDir, '.vite', 'manifest.json'), 'utf8')) as Manifest;
  const entryKey = Object.keys(manifest).find((k) => manifest[k]?.isEntry);
  if (!entryKey) throw new Error('The build has no entry chunk');

  /** The chunks a key needs before it runs: itself and its static imports, transitively. */
  const closure = (key: string, into = new Set<string>()): Set<string> => {
    const chunk = manifest[key];
    if (!chunk) throw new Error(`${key} is not in the build (was the route module renamed?)`);
    if (into.has(chunk.file)) return into;
    into.add(chunk.file);
    for (const k of chunk.imports ?? []) closure(k, into);
    return into;
  };
  const gzipKb = (file: string) => zlib.gzipSync(fs.readFileSync(path.join(outDir, file)), { level: 9 }).length / 1024;
  const heavySources = (file: string): string[] => {
    const map = path.join(outDir, `${file}.map`);
    if (!fs.existsSync(map)) return [];
    const sources = (JSON.parse(fs.readFileSync(map, 'utf8')) as { sources: string[] }).sources;
    return [...new Set(sources.map((s) => HEAVY.exec(s)?.[1]).filter((s): s is string => !!s))];
  };

  let failed = false;
  for (const b of BUDGETS) {
    const files = closure(entryKey);
    for (const m of b.modules) closure(m, files);
    const total = [...files].reduce((sum, f) => sum + gzipKb(f), 0);
    const heavy = [...new Set([...files].flatMap(heavySources))];
    if (process.env.BUDGET_DETAIL) for (const f of files) console.log(`       ${gzipKb(f).toFixed(1).padStart(6)} KB  ${f}`);
    const ok = total <= b.maxGzipKb && heavy.length === 0;
    failed ||= !ok;
    console.log(
      `${ok ? 'ok  ' : 'FAIL'} ${b.screen.padEnd(8)} initial JS ${total.toFixed(1).padStart(6)} KB gzip (budget ${b.maxGzipKb} KB) in ${files.size} chunks` +
        (heavy.length ? `; carries ${heavy.join(', ')}` : ''),
    );
  }
  const all = Object.values(manifest).filter((c) => c.file.endsWith('.js'));
  const totalKb = all.reduce((sum, c) => sum + gzipKb(c.file), 0);
  console.log(`     whole client ${totalKb.toFixed(1)} KB gzip in ${all.length} chunks (loaded screen by screen)`);
  if (failed) process.exitCode = 1;
} finally {
  fs.rmSync(outDir, { recursive: true, force: true });
}
