import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    // The browser tests run apart: `npm run test:browser` (vitest.browser.config.ts).
    exclude: ['test/browser/**', 'node_modules/**'],
    testTimeout: 60000,
    pool: 'forks',
  },
});
