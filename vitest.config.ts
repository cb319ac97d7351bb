import { defineConfig } from 'vitest/config';

/**
 * Two projects: `fast` is what `npm test` runs; `slow` (`npm run test:slow`, CI runs both) holds
 * the tests that start real processes, browsers or walk the whole SR28 release: the kill and
 * restart test, socket and fuzz tests, the browser tests, the name-index equivalence checks and
 * the compiled program's start.
 */
const SLOW = [
  'test/security/kill.db.test.ts',
  'test/security/socket.db.test.ts',
  'test/security/fuzz.db.test.ts',
  'test/foods/name-index.db.test.ts',
  'test/diary/prepare.db.test.ts',
  'test/**/*.e2e.db.test.ts',
  'test/cli/compiled.db.test.ts',
];

export default defineConfig({
  test: {
    exclude: ['node_modules/**', 'dist/**', 'test/bench/**'],
    allowOnly: !process.env.CI,
    testTimeout: 60_000,
    hookTimeout: 120_000,
    pool: 'forks',
    reporters: ['default', './test/helpers/slowest-reporter.ts'],
    projects: [
      // Test files share a worker's loaded modules (isolate: false): each file used to import
      // the program afresh, which was a fifth of the run. Tests build their own databases and
      // apps, so nothing they check lives in module state.
      {
        extends: true,
        test: { name: 'fast', include: ['test/**/*.test.ts'], exclude: SLOW, isolate: false },
      },
      { extends: true, test: { name: 'slow', include: SLOW } },
    ],
  },
});
