import { defineConfig } from 'vitest/config';

// One runner for every package. PGlite instances are heavy (~0.5-0.9 GB each), so at most two files run at once.
export default defineConfig({
  test: {
    include: ['packages/*/src/**/*.test.ts', 'apps/*/src/**/*.test.ts', 'test/**/*.test.ts', 'bench/**/*.test.ts'],
    exclude: ['**/node_modules/**', 'test/e2e/**'],
    maxWorkers: 2,
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
});
