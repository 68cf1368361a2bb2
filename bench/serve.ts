import fs from 'node:fs';
import path from 'node:path';
import { monitorEventLoopDelay, performance, PerformanceObserver } from 'node:perf_hooks';
import { pino } from 'pino';
import { createApp } from '../server/app';
import { openDatabase } from '../server/db/client';
import { loadConfig } from '../server/env';
import { createMailer } from '../server/mail/mailer';

// The app on a bench DATA_DIR, in its own process so the load generator does not share its event loop.
// On request over IPC it reports what happened since the last report:
// - the longest event-loop delay (perf_hooks), and the same less the time the kernel kept this process
//   waiting for a CPU (Linux /proc/self/schedstat, the thread's run-queue wait): on a shared 2-core machine
//   a delay is often the process being descheduled, not our code being busy;
// - the longest garbage-collection pause (perf_hooks 'gc' entries);
// - CPU per request (process.cpuUsage over requests served: JavaScript, SQLite, gzip on the thread pool and
//   GC), which holds under the other engineers' load far better than requests per second;
// - the event loop's utilisation (performance.eventLoopUtilization).
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

/** Run-queue wait of this (the main) thread in ms, or null where /proc is not there. */
const runQueueMs = (): number | null => {
  try {
    return Number(fs.readFileSync('/proc/thread-self/schedstat', 'utf8').split(' ')[1]) / 1e6;
  } catch {
    return null;
  }
};
// A 10 ms tick: how late it fires, less how long the thread waited for a CPU meanwhile.
const TICK = 10;
let busyMax = 0;
let lastTick = performance.now();
let lastWait = runQueueMs();
const ticker = setInterval(() => {
  const now = performance.now();
  const wait = runQueueMs();
  const late = now - lastTick - TICK;
  const waited = wait !== null && lastWait !== null ? wait - lastWait : 0;
  busyMax = Math.max(busyMax, late - waited);
  lastTick = now;
  lastWait = wait;
}, TICK);

let gcMax = 0;
let gcTotal = 0;
new PerformanceObserver((list) => {
  for (const e of list.getEntries()) {
    gcMax = Math.max(gcMax, e.duration);
    gcTotal += e.duration;
  }
}).observe({ entryTypes: ['gc'] });

let requests = 0;
let cpu = process.cpuUsage();
let elu = performance.eventLoopUtilization();
const server = app.app.listen(port, '127.0.0.1', () => process.send?.({ ready: true }));
server.on('request', () => requests++);

process.on('message', (m: { report?: boolean; stop?: boolean }) => {
  if (m.report) {
    const used = process.cpuUsage(cpu);
    const busy = performance.eventLoopUtilization(elu);
    process.send?.({
      maxMs: loop.max / 1e6,
      p99Ms: loop.percentile(99) / 1e6,
      busyMaxMs: Math.max(0, busyMax),
      gcMaxMs: gcMax,
      gcMs: gcTotal,
      requests,
      cpuMsPerRequest: requests ? (used.user + used.system) / 1000 / requests : 0,
      utilisation: busy.utilization,
    });
    loop.reset();
    busyMax = 0;
    gcMax = 0;
    gcTotal = 0;
    requests = 0;
    cpu = process.cpuUsage();
    elu = performance.eventLoopUtilization();
  }
  if (m.stop) {
    clearInterval(ticker);
    server.close();
    app.close();
    database.close();
    process.exit(0);
  }
});
