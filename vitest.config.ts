import { fileURLToPath } from 'node:url'
import { defineConfig } from 'vitest/config'

// The same alias Nuxt gives app and server code, so their plain modules can be tested.
const alias = { '#shared': fileURLToPath(new URL('./shared', import.meta.url)) }

// Three projects: plain unit tests (no services); service tests against a PostgreSQL of their
// own, each in a transaction rolled back afterwards; and end-to-end tests that share one build
// of the app and one set of real services, started once per run in tests/setup/global.ts.
export default defineConfig({
  test: {
    projects: [
      {
        resolve: { alias },
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'node',
          testTimeout: 60_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'service',
          include: ['tests/service/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/setup/postgres.ts'],
          testTimeout: 30_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'e2e',
          include: ['tests/api/**/*.test.ts', 'tests/browser/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/setup/global.ts'],
          testTimeout: 60_000,
          hookTimeout: 120_000,
          // Two cores: one test file at a time against the shared app keeps timings sane.
          fileParallelism: false,
        },
      },
    ],
  },
})
