import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    environment: 'node',
    testTimeout: 60_000,
    hookTimeout: 60_000,
    // Two cores on CI: more parallel files only fight over them.
    maxWorkers: 2,
    reporters: ['default'],
  },
});
