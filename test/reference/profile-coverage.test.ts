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
 * cover is binomial: each observed rate must lie within 3 binomial
 * standard deviations, 3·√(p(1 − p)/N), of the nominal p. Rates pooled
 * over the parameters are reported too (not independent, so not tested
 * tighter).
 *
 * Sizes: npm test runs 60 Love trials and 30 trials of each Rayleigh case
 * with a lighter search and ensemble (4–6 rounds, 600–800 kept steps) to
 * stay near a minute on a 2-core machine (the Rayleigh forward step is the
 * slow part); the allowed bands are correspondingly wide.
 * `npm run bench -- profile` runs 200 trials per case at the default
 * effort and prints the rates (restated in the README).
 *
 * Rayleigh picks: P speeds from ν = 0.3 for every layer, and the estimate
 * is given the same ν (the check is of the intervals, not of the P-speed
 * assumption).
 *
 * Observed here (deterministic for these seeds; 68 % / 95 %, per parameter
 * h1, h2, vs1, vs2, vsH):
 *  - Love, 60 trials: 0.72/0.93, 0.70/0.95, 0.60/0.93, 0.70/0.95, 0.73/0.97
 *    (pooled 0.69/0.95);
 *  - Rayleigh, 30 trials: 0.53/0.93, 0.63/0.90, 0.57/0.90, 0.63/0.83,
 *    0.67/0.97 (pooled 0.61/0.91);
 *  - Love + Rayleigh, 30 trials: 0.63/0.83, 0.80/0.97, 0.73/0.93, 0.63/0.87,
 *    0.70/0.87 (pooled 0.70/0.89).
 * The Rayleigh cases sit below nominal at 95 % (within 3 binomial sd at 30
 * trials, but consistently): with the light ensemble (600 steps) the tails
 * are under-sampled. The README says so.
 */
import { describe, expect, it } from 'vitest';
import { INVENTED_TWO_LAYER_SITE } from '../fixtures';
import { runCoverage, type CoverageReport } from './profile-coverage-trials';

const P68 = 0.6826894921370859;
const P95 = 0.95;

function expectRates(r: CoverageReport) {
  for (const { parameter, rate68, rate95 } of r.rates) {
    for (const [rate, p] of [
      [rate68, P68],
      [rate95, P95],
    ] as const) {
      const band = 3 * Math.sqrt((p * (1 - p)) / r.trials);
      if (!(Math.abs(rate - p) <= band)) {
        throw new Error(`${r.name}, ${parameter}: observed ${rate} over ${r.trials} trials, nominal ${p}, allowed ±${band.toFixed(4)} (3 binomial sd)`);
      }
    }
  }
}

const LIGHT = { iterations: 6, chainSteps: 800, burnIn: 200 };
const RAYLEIGH_LIGHT = { iterations: 4, chainSteps: 600, burnIn: 150 };

describe('coverage of the layered estimate over seeded noisy trials', () => {
  it('two Love layers over a half-space, 20 picks 3–50 Hz: every parameter covers at about 68 % and 95 %', () => {
    const r = runCoverage({
      name: 'Love, 2 layers',
      model: INVENTED_TWO_LAYER_SITE,
      waves: [{ wave: 'love', count: 20, from: 3, to: 50 }],
      poisson: 0.3,
      trials: 60,
      seed: 17,
      effort: LIGHT,
    });
    expectRates(r);
    expect(Math.abs(r.pooled68 - P68)).toBeLessThan(0.1);
    expect(Math.abs(r.pooled95 - P95)).toBeLessThan(0.05);
    console.log(JSON.stringify(r));
  }, 600_000);

  it('two layers from 12 Rayleigh picks, 3–50 Hz: every parameter covers at about 68 % and 95 %', () => {
    const r = runCoverage({
      name: 'Rayleigh, 2 layers',
      model: INVENTED_TWO_LAYER_SITE,
      waves: [{ wave: 'rayleigh', count: 12, from: 3, to: 50 }],
      poisson: 0.3,
      trials: 30,
      seed: 29,
      effort: RAYLEIGH_LIGHT,
    });
    expectRates(r);
    console.log(JSON.stringify(r));
  }, 900_000);

  it('two layers from 8 Love and 8 Rayleigh picks jointly: every parameter covers at about 68 % and 95 %', () => {
    const r = runCoverage({
      name: 'Love + Rayleigh, 2 layers',
      model: INVENTED_TWO_LAYER_SITE,
      waves: [
        { wave: 'love', count: 8, from: 3, to: 50 },
        { wave: 'rayleigh', count: 8, from: 3, to: 50 },
      ],
      poisson: 0.3,
      trials: 30,
      seed: 31,
      effort: RAYLEIGH_LIGHT,
    });
    expectRates(r);
    console.log(JSON.stringify(r));
  }, 900_000);
});
