import { defineConfig } from 'vitest/config';

// Unit and integration tests. Engine tests are pure; app tests use a temporary SQLite file.
export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    testTimeout: 60_000,
    hookTimeout: 60_000,
  },
});
