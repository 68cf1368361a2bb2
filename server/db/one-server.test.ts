import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import * as tar from 'tar';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { openDatabase } from './client';

// Real processes, as a person would start them: the server, then a second server and a restore on the
// same DATA_DIR while the first still runs.
let dataDir: string;
let first: ChildProcess;
const env = () => ({ ...process.env, NODE_ENV: 'development', DATA_DIR: dataDir, PORT: '0', HOST: '127.0.0.1', DEMO_DATA: 'false', LOG_LEVEL: 'warn' });
const tsx = (script: string, args: string[] = []) =>
  spawnSync(process.execPath, ['--import', 'tsx', script, ...args], { env: env(), encoding: 'utf8', timeout: 120_000 });

beforeAll(async () => {
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-one-server-'));
  first = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], { env: env(), stdio: ['ignore', 'pipe', 'pipe'] });
  await new Promise<void>((resolve, reject) => {
    let out = '';
    first.stdout!.on('data', (d: Buffer) => {
      out += d.toString();
      if (out.includes('Lumenbook is serving')) resolve();
    });
    first.once('exit', (code) => reject(new Error(`the first server exited with ${code}`)));
  });
}, 120_000);

afterAll(async () => {
  if (first.exitCode === null) {
    const exited = new Promise((resolve) => first.once('exit', resolve));
    first.kill('SIGTERM');
    await exited;
  }
  fs.rmSync(dataDir, { recursive: true, force: true });
}, 30_000);

it('a second server on the same DATA_DIR refuses to start, saying why', () => {
  const second = tsx('server/index.ts');
  expect(second.status).toBe(1);
  expect(second.stderr).toMatch(/Lumenbook cannot start: Another Lumenbook process is using .*lumenbook\.db/);
}, 120_000);

it('a restore while the server runs is refused, and says why', async () => {
  // A good backup archive, made from a fresh database of our own.
  const src = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-one-server-src-'));
  openDatabase(path.join(src, 'lumenbook.db')).close();
  fs.writeFileSync(path.join(src, 'manifest.json'), JSON.stringify({ format: 'lumenbook-backup', version: 1, createdAt: new Date().toISOString(), photos: 0 }));
  const archive = path.join(src, 'backup.tar.gz');
  await tar.c({ gzip: true, file: archive, cwd: src }, ['manifest.json', 'lumenbook.db']);
  const restore = tsx('server/db/restore-cli.ts', [archive]);
  expect(restore.status).toBe(1);
  expect(restore.stdout).not.toMatch(/Restored/);
  expect(restore.stderr).toMatch(/Not restored: Another Lumenbook process is using/);
  fs.rmSync(src, { recursive: true, force: true });
}, 120_000);
