import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

// `npm run test:scale` only (server/scripts/scale-test.sh starts the clusters these suites use); not part of `npm test`.
export default defineConfig({
  root: fileURLToPath(new URL('../..', import.meta.url)),
  test: {
    include: ['test/scale/**/*.test.ts'],
    environment: 'node',
    testTimeout: 300_000,
    hookTimeout: 120_000,
    fileParallelism: false,
  },
});
