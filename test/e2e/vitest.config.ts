import { defineConfig } from 'vitest/config';

/**
 * The browser tests: the built app served by `vite preview`, driven in Debian's Chromium through
 * playwright-core. One file at a time (each starts its own browser; the machine has two cores).
 */
export default defineConfig({
  test: {
    root: new URL('../..', import.meta.url).pathname,
    include: ['test/e2e/**/*.test.ts'],
    environment: 'node',
    globalSetup: ['test/e2e/global-setup.ts'],
    fileParallelism: false,
    testTimeout: 90_000,
    hookTimeout: 120_000,
    reporters: process.env.CI ? ['default', ['json', { outputFile: 'test-output/vitest-e2e.json' }]] : ['default'],
  },
});
