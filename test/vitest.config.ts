import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

// Node-side suites: shared computation, server, broker, simulator. Angular specs run through `ng test`; e2e through test/e2e/run.ts.
export default defineConfig({
  root: fileURLToPath(new URL('..', import.meta.url)),
  test: {
    include: ['test/**/*.test.ts'],
    // test/scale needs the clusters `npm run test:scale` starts.
    exclude: ['test/e2e/**', 'test/scale/**', 'node_modules/**'],
    environment: 'node',
    testTimeout: 30_000,
    hookTimeout: 60_000,
    fileParallelism: true,
    maxWorkers: 2,
  },
});
