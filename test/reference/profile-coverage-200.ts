/**
 * The 200-trial coverage check of one case of issue 13 at the default
 * effort, declared as one vitest test (profile-coverage-rayleigh.test.ts,
 * profile-coverage-joint.test.ts: one file per case, so that the two test
 * workers take them side by side). What is checked and why: the headers
 * of those files and of profile-coverage.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { COVERAGE_CASES, expectRates, runCoverage } from './profile-coverage-trials';

/** Declares the test of the COVERAGE_CASES entry whose name starts with `start`. */
export function describeCoverage200(start: string, what: string): void {
  describe('coverage of the layered estimate over 200 seeded noisy trials', () => {
    it(`${what}: every parameter covers at about 68 % and 95 %, fits are poor as often as chance allows, the search finds the deepest basin`, () => {
      const c = COVERAGE_CASES.find((x) => x.name.startsWith(start))!;
      const r = runCoverage({ ...c, trials: 200 });
      console.log(JSON.stringify(r));
      expectRates(r);
      expect(r.poorFits).toBeLessThanOrEqual(19);
      expect(r.searchMisses).toBeLessThanOrEqual(2);
    }, 900_000);
  });
}
