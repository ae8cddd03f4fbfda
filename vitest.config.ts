import { defineConfig } from 'vitest/config'

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    // Two cores on CI: keep the pool small so long explorations do not starve each other.
    maxWorkers: 2,
    testTimeout: 120_000,
    hookTimeout: 300_000,
  },
})
