import { defineConfig } from 'vitest/config'

// Three projects: unit (pure code), api (HTTP against the built server on a throwaway
// PostgreSQL), browser (Debian's Chromium through playwright-core against the same server).
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'node',
        },
      },
      {
        test: {
          name: 'api',
          include: ['tests/api/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/setup/server.ts'],
          testTimeout: 30_000,
          hookTimeout: 240_000,
          fileParallelism: false,
        },
      },
      {
        test: {
          name: 'browser',
          include: ['tests/browser/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/setup/server.ts', 'tests/setup/chromium.ts'],
          setupFiles: ['tests/setup/browser-page-errors.ts'],
          testTimeout: 60_000,
          hookTimeout: 240_000,
          fileParallelism: false,
        },
      },
    ],
  },
})
