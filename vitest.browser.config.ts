import { defineConfig } from 'vitest/config';

// The browser tests (`npm run test:browser`): Debian's chromium driven by playwright-core.
// Kept apart from `npm test`, which runs without a browser.
export default defineConfig({
  test: {
    include: ['test/browser/**/*.test.ts'],
    testTimeout: 120000,
    hookTimeout: 60000,
    pool: 'forks',
    fileParallelism: false,
  },
});
