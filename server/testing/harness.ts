import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pino } from 'pino';
import request from 'supertest';
import { desc } from 'drizzle-orm';
import { CSRF_HEADER, CSRF_VALUE } from '../../shared/constants/errors';
import { createApp, type LumenbookApp } from '../app';
import { checkpointsSettled } from '../db/checkpoint-apart';
import { openDatabase, type Database_ } from '../db/client';
import { outbox } from '../db/schema/admin';
import { DEMO_PASSWORD, seedDemo } from '../seed';
import { loadConfig, type Config } from '../env';
import { createMailer, type Mailer } from '../mail/mailer';

export interface Harness {
  dir: string;
  config: Config;
  database: Database_;
  mailer: Mailer;
  lumenbook: LumenbookApp;
  clock: { offsetMs: number };
  /** A supertest agent that sends what the browser client sends (cookie jar and CSRF header). */
  agent(): ReturnType<typeof request.agent>;
  signIn(email: string, password?: string): Promise<ReturnType<typeof request.agent>>;
  /** Builds a second app on the same SQLite file, as after a server restart. */
  restart(): Promise<void>;
  lastMail(): typeof outbox.$inferSelect | undefined;
  close(): Promise<void>;
}

/**
 * The real app on a real SQLite file built from the committed migrations, in a temp directory, with
 * mail through the in-process fake SMTP server. Demo data is seeded with a low bcrypt cost for speed.
 */
export interface HarnessOptions {
  seed?: boolean;
  loginLimit?: number;
  /** Failed signing attempts allowed per signer (default: effectively unlimited). */
  signingLimit?: number;
  /** Collects the app's log lines at `info` (otherwise the log is silent). */
  logLines?: string[];
  /** Extra environment (e.g. TRUST_PROXY, APP_URL) over the test defaults. */
  env?: Record<string, string>;
  /** Use this DATA_DIR (e.g. one a backup was restored into) instead of a fresh temp folder. */
  dataDir?: string;
  /** The built client to serve when NODE_ENV is production (default dist/client). */
  clientDir?: string;
}

export async function startHarness(options: HarnessOptions = {}): Promise<Harness> {
  const dir = options.dataDir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-test-'));
  const config = loadConfig({
    NODE_ENV: 'test',
    DATA_DIR: dir,
    LOG_LEVEL: 'silent',
    APP_URL: 'http://localhost:3999',
    SESSION_SECRET: 'test-secret-test-secret-test-secret',
    ...options.env,
  });
  const lines = options.logLines;
  const logger = lines ? pino({ level: 'info' }, { write: (line: string) => void lines.push(line) }) : pino({ level: 'silent' });
  let database = openDatabase(path.join(dir, 'lumenbook.db'));
  if (options.seed !== false) seedDemo(database, { bcryptCost: 4 });
  let mailer = await createMailer(config, database.db, logger);
  const clock = { offsetMs: 0 };
  const build = () =>
    createApp({
      config,
      database,
      mailer,
      logger,
      bcryptCost: 4,
      now: () => new Date(Date.now() + clock.offsetMs),
      loginRateLimit: { windowMs: 60_000, limit: options.loginLimit ?? 1000, perAddress: (options.loginLimit ?? 1000) * 3 },
      signingRateLimit: { windowMs: 60_000, limit: options.signingLimit ?? 1000 },
      clientDir: options.clientDir,
    });
  let lumenbook = build();

  const h: Harness = {
    dir,
    config,
    get database() {
      return database;
    },
    get mailer() {
      return mailer;
    },
    get lumenbook() {
      return lumenbook;
    },
    clock,
    agent() {
      const a = request.agent(lumenbook.app);
      a.set(CSRF_HEADER, CSRF_VALUE);
      return a;
    },
    async signIn(email, password = DEMO_PASSWORD) {
      const a = h.agent();
      const res = await a.post('/api/auth/login').send({ email, password });
      if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
      return a;
    },
    async restart() {
      lumenbook.close();
      await mailer.close();
      database.close();
      database = openDatabase(path.join(dir, 'lumenbook.db'));
      mailer = await createMailer(config, database.db, logger);
      lumenbook = build();
    },
    lastMail() {
      return database.db.select().from(outbox).orderBy(desc(outbox.id)).limit(1).get();
    },
    async close() {
      lumenbook.close();
      await mailer.close();
      database.close();
      await checkpointsSettled();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
  return h;
}

/** Pulls the one-time token out of a mailed link. */
export function tokenFromMail(text: string | undefined): string {
  const m = text?.match(/token=([A-Za-z0-9_-]+)/);
  if (!m?.[1]) throw new Error(`no token link in mail: ${text}`);
  return m[1];
}
