import { defineConfig } from 'vitest/config';

// One config for unit, integration (real PostgreSQL) and browser tests (real chromium).
// Files run one at a time because integration and browser files share the test database.
export default defineConfig({
  test: {
    environment: 'node',
    include: ['tests/**/*.test.ts'],
    globalSetup: ['tests/support/global-setup.ts'],
    fileParallelism: false,
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
});
