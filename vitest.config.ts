// Test runner settings: Node environment, generous timeouts for tests that start processes or Chromium.
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    environment: 'node',
    testTimeout: 60_000,
    hookTimeout: 60_000,
    pool: 'forks',
    // The CLI tests run bin/kvarbook.mjs, which runs the bundle: rebuilt first when a source changed.
    globalSetup: ['test/support/freshBundle.ts'],
  },
});
