import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    // Numerical verification cases run real solves; give them room, but never judge speed here
    // (speed is measured by `npm run bench`, not by tests).
    testTimeout: 120_000,
    hookTimeout: 120_000,
    pool: 'forks',
  },
});
