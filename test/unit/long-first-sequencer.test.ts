/**
 * The list of long test files that start first on a run without vitest's
 * own timings (test/long-first-sequencer.ts) names test files that exist,
 * each once, so that a renamed file is noticed here rather than silently
 * starting late.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { LONG_FILES } from '../long-first-sequencer';

const ROOT = join(import.meta.dirname, '..', '..');

describe('the long-first list', () => {
  it('names existing test files, each once', () => {
    for (const f of LONG_FILES) {
      expect(f, f).toMatch(/^test\/.+\.test\.tsx?$/);
      expect(existsSync(join(ROOT, f)), `${f} does not exist`).toBe(true);
    }
    expect(new Set(LONG_FILES).size).toBe(LONG_FILES.length);
  });
});
