import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

export default defineConfig({
  resolve: { alias: { '@': fileURLToPath(new URL('./', import.meta.url)) } },
  test: {
    include: ['lib/**/*.test.ts', 'db/**/*.test.ts', 'test/**/*.test.ts'],
    environment: 'node',
    // Builds the app once, says which backend the run uses, and lists at the end
    // the tests skipped for a missing service (test/support/services.ts).
    globalSetup: ['test/support/global-setup.ts'],
    setupFiles: ['test/support/fast-check-setup.ts'],
    testTimeout: 60_000,
    hookTimeout: 120_000,
    // Files run in parallel: each makes its own database and takes free ports.
    fileParallelism: true,
    pool: 'forks',
  },
});
