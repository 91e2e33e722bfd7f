import { defineConfig } from 'vitest/config'

// Unit tests live beside their code; API and browser tests under tests/.
export default defineConfig({
  test: {
    include: ['shared/**/*.test.ts', 'server/**/*.test.ts', 'scripts/**/*.test.ts', 'tests/**/*.test.ts'],
    testTimeout: 60_000,
    hookTimeout: 120_000,
    pool: 'forks',
    fileParallelism: true,
    maxWorkers: 2,
  },
})
