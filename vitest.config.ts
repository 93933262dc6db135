/**
 * The test settings (vitest prefers this file to vite.config.ts, whose app
 * settings it takes over).
 *
 * - Tests run from the repository root (the app's vite root is pwa/).
 * - At least two workers: vitest's own default is one fewer than the
 *   cores, a single one on CI's 2-core machine, where the browser and
 *   office tests spend much of their time waiting on Chromium, the office
 *   server or the app's compute worker.
 * - The longest files start first (test/long-first-sequencer.ts), so that
 *   no long file starts near the end and runs alone; every run writes each
 *   file's time to test-results/file-times.json (test/file-times-reporter.ts).
 */
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { configDefaults, defineConfig, mergeConfig } from 'vitest/config';
import LongFirstSequencer from './test/long-first-sequencer';
import app from './vite.config';


export default mergeConfig(
  app,
  defineConfig({
    test: {
      root: fileURLToPath(new URL('.', import.meta.url)),
      environment: 'node',
      testTimeout: 30_000,
      hookTimeout: 120_000,
      maxWorkers: Math.max(2, availableParallelism() - 1),
      sequence: { sequencer: LongFirstSequencer },
      reporters: ['default', './test/file-times-reporter.ts', './test/summary-reporter.ts'],
      projects: [
        { extends: true, test: { name: 'tests', include: ['test/**/*.test.ts', 'test/**/*.test.tsx'], exclude: [...configDefaults.exclude] } },
      ],
    },
  }),
);
