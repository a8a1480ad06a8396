import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    // Tests only: never the compiled copies in dist/.
    include: ['tests/**/*.test.ts'],
    exclude: ['dist/**', 'node_modules/**'],
    globalSetup: ['tests/global-setup.ts'],
    testTimeout: 60_000,
    hookTimeout: 120_000,
    pool: 'forks',
    env: { TZ: 'UTC' },
  },
});
