// Test runner settings: Node environment, generous timeouts for tests that start processes or Chromium, one worker per core.
import { availableParallelism } from 'node:os';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    environment: 'node',
    testTimeout: 60_000,
    hookTimeout: 60_000,
    // Forks, not threads: tests change the working folder and start processes. Vitest's default leaves one core
    // idle (cores - 1, which is one worker on a 2-core machine); most files wait on child processes or Chromium
    // much of the time, so every core gets a worker.
    pool: 'forks',
    maxWorkers: availableParallelism(),
    // The CLI tests run bin/kvarbook.mjs, which runs the bundle: rebuilt first when a source changed.
    globalSetup: ['test/support/freshBundle.ts'],
  },
});
