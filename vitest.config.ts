import { fileURLToPath } from 'node:url'
import { defineConfig } from 'vitest/config'

// Two projects: pure unit tests, and the app tier (integration + browser) that shares one
// MariaDB test database, mail catcher and built server started by tests/support/global-setup.ts.
export default defineConfig({
  // Services import shared code through Nuxt's alias; tests that call them directly resolve it the same way.
  resolve: { alias: { '#shared': fileURLToPath(new URL('./shared', import.meta.url)) } },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'node',
        },
      },
      {
        extends: true,
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
