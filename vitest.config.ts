import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    // Two cores: run files in parallel but keep the pool small so worker-thread solves get a core.
    maxWorkers: 2,
  },
});
