import { defineConfig } from 'vitest/config';

// JSX settings come from tsconfig.json (jsxImportSource preact), so the tests need no Vite plugin.
export default defineConfig({
  test: {
    environment: 'node',
    include: ['test/**/*.test.ts'],
    exclude: ['test/e2e/**', 'node_modules/**'],
    // In CI a JSON report lands in test-output/ so .ci/run can print one "N passed, N failed" line.
    reporters: process.env.CI ? ['default', ['json', { outputFile: 'test-output/vitest.json' }]] : ['default'],
  },
});
