// The server's production build: its TypeScript bundled into one ES module, dist/server/index.mjs, which
// `npm start` runs with plain node. Why not tsx, as `npm run dev` does: tsx's loader keeps a thread with a
// V8 heap of its own and every module's transformed source and source map, about 50 MB of the idle
// server's resident memory (docs/decisions/0019-server-bundle-for-production.md, bench/server-memory.ts).
//
//   npm run build:server          (also part of `npm run build`)
//
// Packages stay in node_modules (imported as they are); our code (server/ and shared/) is bundled. esbuild
// is the one tsx itself runs on, so it transforms exactly as development does. Paths the server needs at run
// time (the client build, the migrations) are found from the project's folder (server/paths.ts), not from
// the file's place, so they hold from the bundle too.
import fs from 'node:fs';
import path from 'node:path';
import { build, type BuildOptions } from 'esbuild';

const root = path.resolve(import.meta.dirname, '..');
const out = path.join(root, 'dist/server');

const common: BuildOptions = {
  absWorkingDir: root,
  bundle: true,
  platform: 'node',
  target: 'node20',
  format: 'esm',
  packages: 'external',
  // Written beside the bundle for whoever debugs (`node --enable-source-maps dist/server/index.mjs`); not
  // loaded by default, since Node would then hold it in memory.
  sourcemap: 'linked',
  logLevel: 'warning',
};

fs.rmSync(out, { recursive: true, force: true });
await build({ ...common, entryPoints: ['server/index.ts'], outfile: path.join(out, 'index.mjs') });

// The demo's first seed runs in a worker thread (server/demo-seed.ts), which the bundle starts from
// `./seed-worker.mjs` beside it.
await build({ ...common, entryPoints: ['server/db/seed-worker.ts'], outfile: path.join(out, 'seed-worker.mjs') });
