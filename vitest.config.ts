import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

export default defineConfig({
  resolve: { alias: { '@': fileURLToPath(new URL('./', import.meta.url)) } },
  test: {
    include: ['lib/**/*.test.ts', 'db/**/*.test.ts', 'test/**/*.test.ts'],
    environment: 'node',
    globalSetup: ['test/support/global-setup.ts'],
    setupFiles: ['test/support/fast-check-setup.ts'],
    testTimeout: 60_000,
    hookTimeout: 120_000,
    // Integration tests share one PostgreSQL database and fixed broker ports.
    fileParallelism: true,
    pool: 'forks',
  },
});
