import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/unit/**/*.test.ts'],
    environment: 'node',
    // Two cores on our machines: keep the pool small so SQLite and file tests do not starve each other.
    maxWorkers: 2,
    testTimeout: 30_000,
  },
});
