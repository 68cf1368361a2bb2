import { defineConfig } from 'vitest/config';

// Unit, domain and API tests. Browser journeys live in tests/e2e and run under Playwright.
export default defineConfig({
  test: {
    include: ['shared/**/*.test.ts', 'server/**/*.test.ts', 'src/**/*.test.{ts,tsx}', 'tests/lint/**/*.test.ts'],
    setupFiles: ['tests/setup/fail-on-console-error.ts'],
    environment: 'node',
    testTimeout: 20000,
    hookTimeout: 30000,
    pool: 'forks',
    benchmark: { include: ['**/*.bench.ts'], exclude: ['node_modules/**'] },
  },
});
