import { defineConfig } from 'vitest/config'

// Two projects: pure unit tests, and the app tier (integration + browser) that shares one
// MariaDB test database, mail catcher and built server started by tests/support/global-setup.ts.
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
          name: 'app',
          include: ['tests/integration/**/*.test.ts', 'tests/browser/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/support/global-setup.ts'],
          fileParallelism: false,
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
    ],
  },
})
