import { fileURLToPath } from 'node:url'
import { defineConfig } from 'vitest/config'

const root = fileURLToPath(new URL('.', import.meta.url))
const alias = { '#shared': `${root}shared`, '~': `${root}app` }

export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: { name: 'unit', environment: 'node', include: ['tests/unit/**/*.test.ts'], sequence: { groupOrder: 0 } }
      },
      {
        resolve: { alias },
        test: {
          name: 'api',
          environment: 'node',
          include: ['tests/api/**/*.test.ts'],
          exclude: ['tests/api/abuse.test.ts'],
          testTimeout: 30_000,
          hookTimeout: 60_000,
          fileParallelism: true,
          maxWorkers: 2,
          sequence: { groupOrder: 1 }
        }
      },
      {
        // the abuse suite measures the server's responsiveness, so it runs alone, after the other API files
        resolve: { alias },
        test: {
          name: 'abuse',
          environment: 'node',
          include: ['tests/api/abuse.test.ts'],
          testTimeout: 60_000,
          hookTimeout: 120_000,
          fileParallelism: false,
          sequence: { groupOrder: 2 }
        }
      },
      {
        resolve: { alias },
        test: {
          name: 'browser',
          environment: 'node',
          include: ['tests/browser/**/*.test.ts'],
          testTimeout: 60_000,
          hookTimeout: 90_000,
          fileParallelism: false,
          sequence: { groupOrder: 3 }
        }
      }
    ]
  }
})
