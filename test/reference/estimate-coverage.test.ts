/**
 * Honest intervals: over many seeded noisy synthetic trials, the 68 % and
 * 95 % intervals of the estimate cover the true value at close to those
 * rates.
 *
 * Reference: the profile-likelihood intervals are asymptotically exact
 * (Wilks 1938, Ann. Math. Stat. 9:60–62; Press et al., *Numerical Recipes*,
 * 3rd ed. 2007, §15.6): Δχ² = 1 should cover 68.27 % and Δχ² = 3.84 should
 * cover 95 %. The number of trials that cover is binomial, so the observed
 * rate must lie within 3 binomial standard deviations, 3·√(p(1 − p)/N), of
 * the nominal p.
 *
 * Picks: exact velocities of an invented model (H = 12 m, β1 = 200 m/s,
 * β2 = 500 m/s) from core/dispersion/love-layer.ts, plus Gaussian noise of 3 % of the
 * velocity (the sd each pick states). Noise: core/shared/random.ts, the Mulberry32
 * uniform generator (a public-domain 32-bit generator, common practice for
 * seeded tests) and the Box–Muller transform (Box & Muller 1958, Ann. Math.
 * Stat. 29:610).
 *
 * Observed with these seeds (deterministic; re-stated in the report):
 *  - thickness only, 1000 trials: the 68 % interval covers 0.703, the 95 % one
 *    0.959 (allowed: 0.683 ± 0.044 and 0.95 ± 0.021);
 *  - joint H, β1, β2, 200 trials (68 % / 95 %): H 0.630 / 0.960,
 *    β1 0.625 / 0.950, β2 0.650 / 0.935 (allowed: ± 0.099 and ± 0.046).
 *    The joint 68 % rates sit a little below nominal on every parameter
 *    (within sampling error; a mild under-coverage of the asymptotic
 *    Δχ² levels with 20 picks and three free parameters).
 *  - thickness only on two more invented sites, 500 trials each (a thin
 *    6 m 150/600 m/s and a thick 25 m 300/900 m/s site): see the test's
 *    printed line. `npm run bench -- coverage` runs 1,000 trials of each
 *    case, joint included, and prints every rate with its binomial
 *    standard error (measured there: all within 1.7 SE of nominal).
 */
import { describe, expect, it } from 'vitest';
import { DELTA_CHI2_68, estimateLayer, type ParameterEstimate } from '../../core/estimate/estimate';
import type { TwoLayer } from '../../core/dispersion/love-layer';
import { mulberry32 } from '../../core/shared/random';
import { INVENTED_SOFT_SITE, oneLayerPicks, softSitePicks } from '../fixtures';

const TRUE: TwoLayer = INVENTED_SOFT_SITE;
/** Nominal coverage of Δχ² = 1 for one parameter: erf(1/√2). */
const P68 = 0.6826894921370859;
const P95 = 0.95;


const noisyPicks = (rand: () => number, count: number) => softSitePicks(count, rand);

function covers(e: ParameterEstimate, truth: number, level: 68 | 95): boolean {
  return level === 68 ? e.low68 <= truth && truth <= e.high68 : e.low95 <= truth && truth <= e.high95;
}

function expectRate(what: string, hits: number, n: number, p: number) {
  const rate = hits / n;
  const band = 3 * Math.sqrt((p * (1 - p)) / n);
  if (!(Math.abs(rate - p) <= band)) {
    throw new Error(`${what}: observed ${rate} over ${n} trials, nominal ${p}, allowed ±${band.toFixed(4)} (3 binomial sd)`);
  }
  return rate;
}

describe('coverage of the intervals over seeded noisy trials', () => {
  it('Δχ² = 1 is the 68.27 % level', () => {
    expect(DELTA_CHI2_68).toBe(1);
  });

  it('thickness only (speeds known), 1000 trials of 12 picks: 68 % and 95 % within sampling error', () => {
    const rand = mulberry32(20261201);
    const N = 1000;
    let c68 = 0;
    let c95 = 0;
    for (let t = 0; t < N; t++) {
      const r = estimateLayer(noisyPicks(rand, 12), { vs1: 200, vs2: 500 });
      if (covers(r.thickness, TRUE.h, 68)) c68++;
      if (covers(r.thickness, TRUE.h, 95)) c95++;
    }
    const r68 = expectRate('H 68 %', c68, N, P68);
    const r95 = expectRate('H 95 %', c95, N, P95);
    console.log(`coverage, thickness only, ${N} trials: 68 % → ${r68}, 95 % → ${r95}`);
  });

  for (const [name, site, seed] of [
    ['thin site, 6 m of 150 m/s over 600 m/s', { h: 6, vs1: 150, vs2: 600, rho1: 1800, rho2: 2100 }, 611],
    ['thick site, 25 m of 300 m/s over 900 m/s', { h: 25, vs1: 300, vs2: 900, rho1: 1900, rho2: 2200 }, 2511],
  ] as [string, TwoLayer, number][]) {
    it(`thickness only on the invented ${name}, 500 trials of 12 picks: 68 % and 95 % within sampling error`, () => {
      const rand = mulberry32(seed);
      const N = 500;
      let c68 = 0;
      let c95 = 0;
      for (let t = 0; t < N; t++) {
        const r = estimateLayer(oneLayerPicks(site, 12, rand), { vs1: site.vs1, vs2: site.vs2 });
        if (covers(r.thickness, site.h, 68)) c68++;
        if (covers(r.thickness, site.h, 95)) c95++;
      }
      const r68 = expectRate('H 68 %', c68, N, P68);
      const r95 = expectRate('H 95 %', c95, N, P95);
      console.log(`coverage, thickness only, ${name}, ${N} trials: 68 % → ${r68}, 95 % → ${r95}`);
    }, 60_000);
  }

  it('joint thickness and both speeds, 200 trials of 20 picks: every parameter within sampling error', () => {
    const rand = mulberry32(7031);
    const N = 200;
    const hits = { h68: 0, h95: 0, b168: 0, b195: 0, b268: 0, b295: 0 };
    for (let t = 0; t < N; t++) {
      const r = estimateLayer(noisyPicks(rand, 20));
      if (covers(r.thickness, TRUE.h, 68)) hits.h68++;
      if (covers(r.thickness, TRUE.h, 95)) hits.h95++;
      if (covers(r.vs1, TRUE.vs1, 68)) hits.b168++;
      if (covers(r.vs1, TRUE.vs1, 95)) hits.b195++;
      if (covers(r.vs2, TRUE.vs2, 68)) hits.b268++;
      if (covers(r.vs2, TRUE.vs2, 95)) hits.b295++;
    }
    const rates = [
      expectRate('H 68 %', hits.h68, N, P68),
      expectRate('H 95 %', hits.h95, N, P95),
      expectRate('β1 68 %', hits.b168, N, P68),
      expectRate('β1 95 %', hits.b195, N, P95),
      expectRate('β2 68 %', hits.b268, N, P68),
      expectRate('β2 95 %', hits.b295, N, P95),
    ];
    console.log(`coverage, joint, ${N} trials: H ${rates[0]} / ${rates[1]}, β1 ${rates[2]} / ${rates[3]}, β2 ${rates[4]} / ${rates[5]}`);
  }, 60_000);
});
