import { defineConfig } from 'vitest/config';

// npm run test:slow: the slow tier, run by CI after npm test. Its tests spawn
// the built program (npm run build first) or run long property checks; a
// hang is caught by the timeout, and no test measures speed.
export default defineConfig({
  test: {
    include: ['test/**/*.slow.test.ts'],
    testTimeout: 300_000,
    pool: 'forks',
  },
});
