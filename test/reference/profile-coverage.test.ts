/**
 * Honest intervals of the layered estimate: over seeded noisy synthetic
 * trials, the ensemble's 68 % and 95 % intervals hold the true value at
 * close to those rates.
 *
 * Reference: for a likelihood close to Gaussian, the central 68.27 % and
 * 95 % intervals of an ensemble drawn in proportion to the likelihood
 * (flat priors) are the Δχ² = 1 and 3.84 intervals, which cover at those
 * rates asymptotically (Wilks 1938, Ann. Math. Stat. 9:60; Press et al.,
 * *Numerical Recipes*, 3rd ed. 2007, §15.6). The number of trials that
 * cover is binomial: each observed rate, per parameter and pooled over the
 * parameters, must lie within 3 binomial standard deviations,
 * 3·√(p(1 − p)/N), of the nominal p, N the number of trials (the pooled
 * rate is held to the same N, as the parameters of one trial are not
 * independent).
 *
 * Sizes: the two cases of issue 13, two layers from 12 Rayleigh picks and
 * from 8 Love + 8 Rayleigh picks, run 200 trials each at the default effort
 * in profile-coverage-rayleigh.test.ts and profile-coverage-joint.test.ts
 * (about 0.4 s of one core per trial; one file each, so that the two test
 * workers can take them side by side), the same seeded trials as the bench
 * (`npm run bench -- profile`), so npm test and the README's rates agree.
 * This file runs the Love case beside them, 24 trials with a lighter search
 * and ensemble (LIGHT; its 200 trials are in the bench only), whose bands
 * are correspondingly wide (at 24 trials a 95 % rate must reach 0.82):
 * it catches Love intervals that have gone badly wrong.
 *
 * Rayleigh picks: P speeds from ν = 0.3 for every layer, and the estimate
 * is given the same ν (the check is of the intervals, not of the P-speed
 * assumption).
 */
import { describe, expect, it } from 'vitest';
import { COVERAGE_CASES, expectRates, runCoverage } from './profile-coverage-trials';

const LIGHT = { iterations: 5, chainSteps: 1000, burnIn: 300 };
const byName = (start: string) => COVERAGE_CASES.find((c) => c.name.startsWith(start))!;

describe('coverage of the layered estimate over seeded noisy trials', () => {
  it('two Love layers over a half-space, 20 picks 3–50 Hz: every parameter covers at about 68 % and 95 %', () => {
    const r = runCoverage({ ...byName('Love, 2 layers'), trials: 24, seed: 17, effort: LIGHT });
    console.log(JSON.stringify(r));
    expectRates(r);
    expect(r.searchMisses).toBeLessThanOrEqual(1); // the truth fits better than the best fit found in at most one trial
  }, 600_000);
});
