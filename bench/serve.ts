import path from 'node:path';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { pino } from 'pino';
import { createApp } from '../server/app';
import { openDatabase } from '../server/db/client';
import { loadConfig } from '../server/env';
import { createMailer } from '../server/mail/mailer';

// The app on a bench DATA_DIR, in its own process so the load generator does not share its event loop.
// It reports, on request over IPC, the longest event-loop delay since the last report (perf_hooks).
const dir = process.env.DATA_DIR as string;
const port = Number(process.env.PORT ?? 3700);
const config = loadConfig({
  NODE_ENV: 'test',
  DATA_DIR: dir,
  LOG_LEVEL: 'silent',
  APP_URL: `http://127.0.0.1:${port}`,
  SESSION_SECRET: 'bench-secret-bench-secret-bench-secret',
});
const logger = pino({ level: 'silent' });
const database = openDatabase(path.join(dir, 'lumenbook.db'));
const mailer = await createMailer(config, database.db, logger);
const app = createApp({ config, database, mailer, logger, loginRateLimit: { windowMs: 60_000, limit: 1000, perAddress: 1000 } });
const loop = monitorEventLoopDelay({ resolution: 10 });
loop.enable();
const server = app.app.listen(port, '127.0.0.1', () => process.send?.({ ready: true }));
process.on('message', (m: { report?: boolean; stop?: boolean }) => {
  if (m.report) {
    process.send?.({ maxMs: loop.max / 1e6, p99Ms: loop.percentile(99) / 1e6 });
    loop.reset();
  }
  if (m.stop) {
    server.close();
    app.close();
    database.close();
    process.exit(0);
  }
});
