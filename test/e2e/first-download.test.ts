/**
 * The built app's first download stays within issue 4's budget: the gzip
 * size of the JavaScript a first visit loads before the app can run (the
 * entry script of dist/index.html, its modulepreloads and their static
 * imports). A size, not a time, so it is checked here as well as printed by
 * `npm run bench -- app` (test/bench/app.bench.ts measures the same way).
 *
 * Runs against dist/ (npm test builds it before vitest).
 */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { INITIAL_JS_BUDGET_KB, initialScripts } from '../bench/app.bench';

// The repository root, found here rather than taken from ./harness, which would load playwright-core for nothing.
const DIST = join(import.meta.dirname, '..', '..', 'dist');

describe('first download of the built app', () => {
  it(`loads at most ${INITIAL_JS_BUDGET_KB} kB of JavaScript (gzip) before the app runs`, () => {
    if (!existsSync(join(DIST, 'index.html'))) {
      throw new Error('The built app is missing (dist/index.html). Run "npm run build" first (npm test does).');
    }
    const files = initialScripts(readFileSync(join(DIST, 'index.html'), 'utf8'));
    expect(files.length).toBeGreaterThan(0);
    const kB = files.reduce((sum, f) => sum + gzipSync(readFileSync(join(DIST, f)), { level: 9 }).length / 1000, 0);
    expect(kB, `initial JS is ${kB.toFixed(1)} kB gzip (${files.join(' + ')})`).toBeLessThanOrEqual(INITIAL_JS_BUDGET_KB);
  });

  it('keeps the schema checker (ajv) and the record readers out of it', () => {
    const code = initialScripts(readFileSync(join(DIST, 'index.html'), 'utf8'))
      .map((f) => readFileSync(join(DIST, f), 'utf8'))
      .join('\n');
    // ajv's compiled-code runtime names appear only where ajv is bundled.
    expect(code).not.toMatch(/strictTypes/);
    // A message of the SEG-Y reader (core/recordings/segy-read.ts): the
    // readers run in the compute worker, not on the first screen.
    expect(code).not.toMatch(/extended textual headers/);
  });
});
