import os from 'node:os';
import path from 'node:path';
import { defineConfig } from '@playwright/test';

// Browser journeys run in Debian's Chromium (never a downloaded browser) against the production
// build served with fresh demo data in a throw-away data folder.
const PORT = Number(process.env.E2E_PORT ?? 3210);
const dataDir = process.env.E2E_DATA_DIR ?? path.join(os.tmpdir(), `lumenbook-e2e-${process.pid}`);

export default defineConfig({
  testDir: 'tests/e2e',
  timeout: 60_000,
  expect: { timeout: 10_000 },
  fullyParallel: false,
  workers: 1,
  retries: process.env.CI ? 1 : 0,
  reporter: [['list']],
  // `setup` signs each demo role in once (tests/e2e/auth.setup.ts); the journeys reuse those sessions.
  projects: [
    { name: 'setup', testMatch: /auth\.setup\.ts$/ },
    { name: 'journeys', testMatch: /\.spec\.ts$/, dependencies: ['setup'] },
  ],
  use: {
    baseURL: `http://localhost:${PORT}`,
    trace: 'retain-on-failure',
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    },
  },
  webServer: {
    // As `npm start` serves: the client build and the server's bundle (dist/server/index.mjs), plain node.
    command: `rm -rf "${dataDir}" && npm run build && node dist/server/index.mjs`,
    url: `http://localhost:${PORT}/api/health`,
    timeout: 180_000,
    reuseExistingServer: false,
    stdout: 'ignore',
    stderr: 'pipe',
    env: { NODE_ENV: 'production', PORT: String(PORT), DATA_DIR: dataDir, LOG_LEVEL: 'warn', LOGIN_RATE_LIMIT: '1000' },
  },
});
