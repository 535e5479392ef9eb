import { defineConfig } from 'vitest/config';

// npm test: the fast tier. The slow tier (*.slow.test.ts: large hostile
// inputs, the engine against the built-in reader on random CSV text) runs
// with npm run test:slow (vitest.slow.config.ts) and in CI.
export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    exclude: ['test/**/*.slow.test.ts', 'node_modules/**'],
    testTimeout: 60_000,
    pool: 'forks',
  },
});
