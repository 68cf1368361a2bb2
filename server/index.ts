import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { pino } from 'pino';
import { createApp } from './app';
import { checkpointsSettled } from './db/checkpoint-apart';
import { DatabaseInUse, openDatabase } from './db/client';
import { prepareDataDir } from './db/data-dir';
import { seedFreshDemoApart } from './demo-seed';
import { DEMO_PASSWORD, DEMO_USERS, ensureResults, seedDemo, seedReference } from './seed';
import { loadConfig } from './env';
import { createMailer } from './mail/mailer';

/** A session secret that survives restarts without anyone having to set one: kept in DATA_DIR. */
function sessionSecret(dataDir: string, fromEnv: string | undefined): string {
  if (fromEnv) return fromEnv;
  const file = path.join(dataDir, 'session-secret');
  if (fs.existsSync(file)) return fs.readFileSync(file, 'utf8').trim();
  const secret = crypto.randomBytes(32).toString('hex');
  fs.writeFileSync(file, secret, { mode: 0o600 });
  return secret;
}

async function main() {
  const config = loadConfig();
  const logger = pino({ level: config.logLevel });
  prepareDataDir(config.dataDir);
  config.sessionSecret = sessionSecret(config.dataDir, config.sessionSecret);

  const file = path.join(config.dataDir, 'lumenbook.db');
  // A fresh DATA_DIR's demo is written in a worker thread, so what the seed loads goes with it.
  const seededApart = config.demoData && (await seedFreshDemoApart(file));
  // Exclusive: a second server on the same DATA_DIR stops here with a plain message (DatabaseInUse).
  const database = openDatabase(file);
  const seeded = config.demoData ? seedDemo(database) || seededApart : (seedReference(database), false);
  if (ensureResults(database)) logger.info('coupon results computed from the readings');
  const mailer = await createMailer(config, database.db, logger);
  const lumenbook = createApp({
    config,
    database,
    mailer,
    logger,
    loginRateLimit: { windowMs: 15 * 60_000, limit: config.loginRateLimit, perAddress: config.loginRateLimitPerAddress },
  });

  const server = lumenbook.app.listen(config.port, config.host, (err?: Error) => {
    // Express 5 reports listen errors (EADDRINUSE…) here rather than throwing.
    if (err) {
      logger.fatal({ err }, `cannot listen on port ${config.port}`);
      process.exit(1);
    }
    logger.info({ url: config.appUrl }, 'listening');
    // A plain banner for the person who just typed `npm start`, whatever the log format.
    const lines = [`Lumenbook is serving at ${config.appUrl}`];
    if (seeded) lines.push('Demo data written on first start (an invented shop).');
    if (config.demoData) {
      lines.push(`Demo sign-in, password "${DEMO_PASSWORD}":`);
      for (const u of DEMO_USERS) lines.push(`  ${u.role.padEnd(10)} ${u.email}`);
    }
    console.log(`\n${lines.join('\n')}\n`);
  });

  let closing = false;
  const shutdown = (signal: string) => {
    if (closing) return;
    closing = true;
    logger.info({ signal }, 'shutting down');
    server.close(() => {
      lumenbook.close();
      void mailer
        .close()
        .finally(() => database.close())
        // A log copy still running in its thread (checkpoint-apart.ts) ends first; the 10 s timer below bounds it.
        .then(checkpointsSettled)
        .finally(() => process.exit(0));
    });
    server.closeAllConnections();
    setTimeout(() => process.exit(1), 10_000).unref();
  };
  process.on('SIGINT', () => shutdown('SIGINT'));
  process.on('SIGTERM', () => shutdown('SIGTERM'));
}

main().catch((err: unknown) => {
  // Problems of the setup (data folder, a second server, a full disk) are said in one plain sentence.
  const plain = err instanceof DatabaseInUse || (err instanceof Error && /^(DATA_DIR|The database could not|Invalid environment)/.test(err.message));
  console.error(plain ? `Lumenbook cannot start: ${(err as Error).message}` : err);
  process.exit(1);
});
