import { defineConfig } from 'vitest/config';
import path from 'node:path';

export default defineConfig({
  resolve: { alias: { '@': path.resolve(__dirname) } },
  test: {
    include: ['tests/unit/**/*.test.ts', 'tests/integration/**/*.test.ts'],
    environment: 'node',
    // Integration tests open real SQLite files; one file per worker keeps them apart.
    pool: 'forks',
    testTimeout: 60_000,
    hookTimeout: 60_000,
  },
});
