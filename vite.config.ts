/// <reference types="vitest/config" />
import { defineConfig } from 'vite';

// The app build (pwa/) is configured here; vitest reads the `test` key.
export default defineConfig({
  test: {
    include: ['test/**/*.test.ts', 'test/**/*.test.tsx'],
    environment: 'node',
    testTimeout: 30_000,
    hookTimeout: 120_000,
  },
});
