/**
 * The order in which vitest starts the test files: the longest first, so
 * that with two workers no long file starts near the end and runs alone.
 *
 * vitest does this by itself from the durations it keeps of earlier runs
 * (in node_modules/.vite/vitest); without them (a clean clone, as on CI) it
 * starts the largest files first, and file size says little about run time
 * (the 4 kB profile-coverage test is among the longest). So where vitest
 * has no duration for some file, the files named in LONG_FILES start first,
 * in that order, and the rest follow in vitest's own order.
 */
import { relative } from 'node:path';
import { BaseSequencer, type TestSpecification } from 'vitest/node';

/**
 * Test files that take longest, longest first: the order of their times
 * (test-results/file-times.json, from queued to done) in a clean-clone run
 * of npm test with two workers on the 2-core machine at a load of about 4,
 * 2026-12-02 18:17 (984 tests, vitest 277 s), with the two 200-trial
 * coverage files (about 80 s each) put first, 19:00. Keep it roughly up to date
 * from that file after a full run: a file missing here only starts later.
 */
export const LONG_FILES: readonly string[] = [
  'test/reference/profile-coverage-rayleigh.test.ts',
  'test/reference/profile-coverage-joint.test.ts',
  'test/e2e/office-sync-browser.test.ts',
  'test/unit/core/exchange/importer-fuzz.test.ts',
  'test/unit/core/dispersion/love-random.test.ts',
  'test/reference/estimate-coverage.test.ts',
  'test/e2e/phone-layout.test.ts',
  'test/unit/core/recordings/fuzz.test.ts',
  'test/reference/profile-coverage.test.ts',
  'test/e2e/office-server.test.ts',
  'test/e2e/field-trust.test.ts',
  'test/e2e/app.test.ts',
  'test/e2e/records.test.ts',
  'test/e2e/layer-builder.test.ts',
  'test/e2e/office-integrity.test.ts',
  'test/e2e/offline-shell.test.ts',
  'test/e2e/office-sync.test.ts',
  'test/unit/office/site-cli.test.ts',
  'test/e2e/office-exports.test.ts',
  'test/e2e/profile.test.ts',
  'test/unit/core/profile/profile-estimate.test.ts',
  'test/reference/rayleigh-thin-layer-random.test.ts',
  'test/unit/office/estimate-layers-cli.test.ts',
  'test/reference/rayleigh-thin-layer.test.ts',
  'test/unit/office/curve-cli.test.ts',
  'test/e2e/office-integrity-browser.test.ts',
  'test/e2e/office-recordings.test.ts',
  'test/reference/love-thin-layer.test.ts',
];

export default class LongFirstSequencer extends BaseSequencer {
  override async sort(files: TestSpecification[]): Promise<TestSpecification[]> {
    const sorted = await super.sort(files);
    const root = this.ctx.config.root;
    const name = (f: TestSpecification) => relative(root, f.moduleId).replaceAll('\\', '/');
    const timed = sorted.every((f) => this.ctx.cache.getFileTestResults(`${f.project.name}:${relative(root, f.moduleId)}`) !== undefined);
    if (timed) return sorted;
    const rank = (f: TestSpecification) => {
      const i = LONG_FILES.indexOf(name(f));
      return i < 0 ? LONG_FILES.length : i;
    };
    // Array.prototype.sort is stable: files of equal rank keep vitest's order.
    return sorted.sort((a, b) => rank(a) - rank(b));
  }
}
