import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { openDatabase } from '../server/db/client';
import { rebuildResults } from '../server/measurements/results';
import { DEMO_PASSWORD, seedDemo } from '../server/seed';
import { CSRF_HEADER, CSRF_VALUE } from '../shared/constants/errors';
import { addCoupons, scaleFile } from './imports-server';

// The server's resident memory, started as `npm start` starts it, in a child process on a temp DATA_DIR
// holding the demo and N coupons (100,000 by default): idle after start, after a round of the screens' reads,
// and at its highest during the upload and the preview of an N-row scale file; then its first start on an
// empty DATA_DIR (the demo written). Beside each figure, what it
// is made of: the kernel's split (/proc/<pid>/status and smaps: anonymous memory, malloc's heap, the node
// binary and the shared libraries mapped) and V8's (process.memoryUsage and the heap spaces, read by
// bench/memory-probe.mjs inside the server on SIGUSR2).
//
//   BENCH_PORT=3620 npx tsx bench/server-memory.ts [N] [way ...]
//
// Ways to start the server: `bundle` (what `npm start` runs: dist/server/index.mjs, built first by
// `npm run build:server`) and `tsx` (the TypeScript sources through tsx's loader, as `npm run dev` runs them).
// Default: both, so their difference is measured in the same run. MEM_SNAPSHOT_DIR=<folder> also writes a heap
// snapshot there at each reading (<way>-1: idle, -2: at rest, -3: after the reads, -4: after the preview). Writes bench/server-memory-results.md.

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const RESULTS = path.join(root, 'bench/server-memory-results.md');
const PROBE = path.join(root, 'bench/memory-probe.mjs');
const WAYS: Record<string, string[]> = {
  bundle: ['dist/server/index.mjs'],
  tsx: ['--import', 'tsx', 'server/index.ts'],
};

/** When the idle server is read a second time: past V8's memory reducer. */
const REST_MS = 25_000;
const mb = (bytes: number) => (bytes / 1024 / 1024).toFixed(1);

interface Sample {
  rss: number;
  anon: number;
  file: number;
  threads: number;
  /** Resident bytes per mapping kind: anonymous (V8's heaps, thread stacks, malloc's other arenas), [heap] (malloc's main arena), each file. */
  mappings: Map<string, number>;
  v8: { memory: NodeJS.MemoryUsage; spaces: Record<string, { size: number; used: number }> } | null;
}

function status(pid: number) {
  const s = fs.readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = (k: string) => Number(new RegExp(`${k}:\\s+(\\d+)`).exec(s)?.[1] ?? NaN) * 1024;
  return { rss: kb('VmRSS'), anon: kb('RssAnon'), file: kb('RssFile'), threads: kb('Threads') / 1024 };
}

function mappings(pid: number): Map<string, number> {
  const out = new Map<string, number>();
  let name = '';
  for (const line of fs.readFileSync(`/proc/${pid}/smaps`, 'utf8').split('\n')) {
    const head = /^[0-9a-f]+-[0-9a-f]+ \S+ \S+ \S+ \S+\s*(.*)$/.exec(line);
    if (head) name = head[1] || '(anonymous)';
    else if (line.startsWith('Rss:')) out.set(name, (out.get(name) ?? 0) + Number(/(\d+)/.exec(line)![1]) * 1024);
  }
  return out;
}

async function sample(pid: number, probeFile: string): Promise<Sample> {
  fs.rmSync(probeFile, { force: true });
  process.kill(pid, 'SIGUSR2');
  let v8: Sample['v8'] = null;
  for (let i = 0; i < 600 && !v8; i++) {
    await new Promise((r) => setTimeout(r, 50));
    if (fs.existsSync(probeFile)) v8 = JSON.parse(fs.readFileSync(probeFile, 'utf8')) as Sample['v8'];
  }
  return { ...status(pid), mappings: mappings(pid), v8 };
}

function describe(label: string, s: Sample): string[] {
  const lines = [`  ${label}: RSS ${mb(s.rss)} MB (anonymous ${mb(s.anon)}, files ${mb(s.file)}), ${s.threads} threads`];
  const top = [...s.mappings].sort((a, b) => b[1] - a[1]).slice(0, 6);
  lines.push(`    mapped: ${top.map(([n, b]) => `${path.basename(n)} ${mb(b)}`).join(', ')}`);
  if (s.v8) {
    const m = s.v8.memory;
    lines.push(`    V8: heap ${mb(m.heapTotal)} MB reserved, ${mb(m.heapUsed)} used; external ${mb(m.external)} (array buffers ${mb(m.arrayBuffers)})`);
    const spaces = Object.entries(s.v8.spaces).filter(([, v]) => v.size >= 512 * 1024);
    lines.push(`    heap spaces (reserved/used MB): ${spaces.map(([n, v]) => `${n.replace('_space', '')} ${mb(v.size)}/${mb(v.used)}`).join(', ')}`);
  }
  return lines;
}

/** The demo and n coupons with their results rows, made once and copied for each way of starting. */
function prepare(n: number): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-memory-base-'));
  const d = openDatabase(path.join(dir, 'lumenbook.db'));
  seedDemo(d, { bcryptCost: 4 });
  addCoupons(d, n);
  d.db.transaction((tx) => rebuildResults(tx));
  d.close();
  return dir;
}

/** Starts the server one way on dataDir, resolving once it says it serves. */
async function start(way: string, dataDir: string, port: number, probeFile: string, snapshot?: string): Promise<ChildProcess> {
  const child = spawn(process.execPath, ['--import', PROBE, ...WAYS[way]!], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: 'production',
      DATA_DIR: dataDir,
      PORT: String(port),
      HOST: '127.0.0.1',
      DEMO_DATA: 'true',
      LOG_LEVEL: 'warn',
      MEM_PROBE_OUT: probeFile,
      ...(snapshot ? { MEM_PROBE_SNAPSHOT: snapshot } : {}),
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  await new Promise<void>((resolve, reject) => {
    let out = '';
    child.stdout!.on('data', (d: Buffer) => {
      out += d.toString();
      if (out.includes('Lumenbook is serving')) resolve();
    });
    child.stderr!.on('data', (d: Buffer) => (out += d.toString()));
    child.once('exit', (code) => reject(new Error(`the server exited with ${code}: ${out}`)));
  });
  return child;
}

async function stop(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null) return;
  const exited = new Promise((r) => child.once('exit', r));
  child.kill('SIGTERM');
  await exited;
}

/** A first start on an empty DATA_DIR: the demo is written (in a worker thread) before the server serves. */
async function firstStart(way: string, port: number): Promise<string[]> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), `lumenbook-memory-first-${way}-`));
  const probeFile = path.join(dataDir, 'probe.json');
  try {
    const child = await start(way, dataDir, port, probeFile);
    try {
      await new Promise((r) => setTimeout(r, 2000));
      const s = await sample(child.pid!, probeFile);
      const hwm = Number(/VmHWM:\s+(\d+)/.exec(fs.readFileSync(`/proc/${child.pid!}/status`, 'utf8'))![1]) * 1024;
      return [`${way}, first start on an empty DATA_DIR (the demo written):`, ...describe('idle after start', s), `  high-water mark: ${mb(hwm)} MB`];
    } finally {
      await stop(child);
    }
  } finally {
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}

async function measure(way: string, base: string, n: number, port: number): Promise<string[]> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), `lumenbook-memory-${way}-`));
  fs.cpSync(base, dataDir, { recursive: true });
  const probeFile = path.join(dataDir, 'probe.json');
  const snapshotDir = process.env.MEM_SNAPSHOT_DIR;
  const lines = [`${way} (node ${WAYS[way]!.join(' ')}), the demo and ${n} coupons:`];
  let child: ChildProcess | null = null;
  try {
    child = await start(way, dataDir, port, probeFile, snapshotDir ? path.resolve(snapshotDir, way) : undefined);
    const pid = child.pid!;
    // Idle: two seconds after it said it serves, nobody asking; and at rest, once V8's memory reducer has run
    // (it shrinks the young generation some 10–20 s after the last collection when nothing is allocated).
    await new Promise((r) => setTimeout(r, 2000));
    lines.push(...describe('idle, 2 s after start', await sample(pid, probeFile)));
    await new Promise((r) => setTimeout(r, REST_MS - 2000));
    lines.push(...describe(`at rest, ${REST_MS / 1000} s after start`, await sample(pid, probeFile)));

    const base = `http://127.0.0.1:${port}`;
    const login = await fetch(`${base}/api/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', [CSRF_HEADER]: CSRF_VALUE },
      body: JSON.stringify({ email: 'tech@demo.test', password: DEMO_PASSWORD }),
    });
    if (login.status !== 200) throw new Error(`sign-in failed: ${login.status}`);
    const cookie = login.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ');
    const headers = { cookie, [CSRF_HEADER]: CSRF_VALUE };

    // A round of the screens a technician opens first (the lists at 100k coupons, the Bench, analysis).
    const reads = [
      '/api/auth/me',
      '/api/runs',
      '/api/trials',
      '/api/bench',
      '/api/coupons',
      '/api/species',
      '/api/imports',
      '/api/findings',
      '/api/wiki',
      '/api/analysis/overview',
      '/api/analysis/summary',
    ];
    const answered: string[] = [];
    for (const url of reads) {
      const res = await fetch(`${base}${url}`, { headers });
      await res.arrayBuffer();
      answered.push(`${url} ${res.status}`);
    }
    await new Promise((r) => setTimeout(r, 1000));
    lines.push(...describe(`after the screens' reads (${answered.join(', ')})`, await sample(pid, probeFile)));

    // Upload and preview of an n-row file, resident memory read every 20 ms.
    let phase: 'upload' | 'preview' = 'upload';
    const peak = { upload: 0, preview: 0 };
    const sampler = setInterval(() => {
      try {
        peak[phase] = Math.max(peak[phase], status(pid).rss);
      } catch {
        // the server is gone; the request below says why
      }
    }, 20);
    try {
      const json = async (res: Response) => {
        const body = (await res.json()) as Record<string, unknown>;
        if (res.status >= 400) throw new Error(`${res.status}: ${JSON.stringify(body)}`);
        return body;
      };
      const form = new FormData();
      form.append('file', new Blob([Buffer.from(`${scaleFile(n)}\r\n`)], { type: 'text/csv' }), 'bench-memory.csv');
      const d = await json(await fetch(`${base}/api/imports`, { method: 'POST', headers, body: form }));
      const s = (d.detected as { suggested: Record<string, number | null> }).suggested;
      const mapping = {
        format: { encoding: 'utf-8', delimiter: ',', hasHeader: true, decimal: '.', dateOrder: 'ymd' },
        target: { mode: 'tag', tagColumn: s.tagColumn },
        massColumn: s.massColumn,
        unitColumn: s.unitColumn,
        dateColumn: s.dateColumn,
        timeColumn: s.timeColumn,
        stage: 'dry',
      };
      phase = 'preview';
      await json(
        await fetch(`${base}/api/imports/${String(d.id)}/preview`, {
          method: 'POST',
          headers: { ...headers, 'content-type': 'application/json' },
          body: JSON.stringify({ mapping }),
        }),
      );
      for (;;) {
        const b = await json(await fetch(`${base}/api/imports/${String(d.id)}`, { headers }));
        if (b.status !== 'previewing') break;
        await new Promise((r) => setTimeout(r, 50));
      }
    } finally {
      clearInterval(sampler);
    }
    lines.push(`  highest during the import of ${n} rows: upload ${mb(peak.upload)} MB, preview ${mb(peak.preview)} MB`);
    await new Promise((r) => setTimeout(r, 2000));
    lines.push(...describe('two seconds after the preview', await sample(pid, probeFile)));
    lines.push(`  high-water mark: ${mb(Number(/VmHWM:\s+(\d+)/.exec(fs.readFileSync(`/proc/${pid}/status`, 'utf8'))![1]) * 1024)} MB`);
  } finally {
    if (child) await stop(child);
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
  return lines;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const n = Number(process.argv[2] ?? 100_000);
  const ways = process.argv.slice(3).length ? process.argv.slice(3) : Object.keys(WAYS);
  for (const w of ways) if (!WAYS[w]) throw new Error(`unknown way "${w}": ${Object.keys(WAYS).join(', ')}`);
  const port = Number(process.env.BENCH_PORT ?? 3800);
  if (ways.includes('bundle')) execFileSync('npm', ['run', '--silent', 'build:server'], { cwd: root, stdio: 'inherit' });
  const base = prepare(n);
  const lines = [
    `Written by bench/server-memory.ts on ${new Date().toISOString()}, load average ${os
      .loadavg()
      .map((l) => l.toFixed(2))
      .join(', ')} (${os.cpus().length} cores, shared)`,
    '',
    'Before decision 0019 (every library loaded at start; same bench, 2026-12-02, load average ~2 on 2 shared cores): tsx idle 211.5 MB',
    '(V8 heap 88 MB reserved, 46 used), after the reads 311.5 MB, highest during the preview 483.9 MB; bundle idle 157.7 MB. First start',
    'on an empty DATA_DIR (the demo seeded in the server itself, jsdom and Plot held from then on): bundle idle 184 MB.',
    'A heap snapshot (MEM_SNAPSHOT_DIR) inflates every figure read after it (-1: idle, -2: at rest, -3: after the reads, -4: after the preview).',
    '',
  ];
  try {
    for (const way of ways) {
      const got = await measure(way, base, n, port);
      console.log(got.join('\n'));
      lines.push(...got, '');
    }
    for (const way of ways) {
      const got = await firstStart(way, port);
      console.log(got.join('\n'));
      lines.push(...got, '');
    }
  } finally {
    fs.rmSync(base, { recursive: true, force: true });
  }
  lines.push(
    `load average after: ${os
      .loadavg()
      .map((l) => l.toFixed(2))
      .join(', ')}`,
  );
  fs.writeFileSync(RESULTS, `${lines.join('\n')}\n`);
  console.log(`written to ${path.relative(root, RESULTS)}`);
}
