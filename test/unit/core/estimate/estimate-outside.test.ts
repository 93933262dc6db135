/**
 * The "outside what the best model can carry" diagnostic (issue 9 §3):
 * it allows for the pick's own sd (more than 3 sd beyond a bound, common
 * practice) and uses an Airy minimum sampled finely enough.
 *
 * Check values: the Airy minimum by a dense scan, written here, of the
 * closed-form group velocity U = (μ1 L + μ2 B) / (c (ρ1 L + ρ2 B))
 * (Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §7.3, as in
 * shared/PHYSICS.md §3; core/dispersion/love-layer.ts evaluates it), 4,000
 * points across the minimum's neighbourhood then 4,000 across the best cell.
 * Bounds β1 < c < β2 and U < β2 follow from the same section.
 * Picks: the invented soft site (test/fixtures.ts) with seeded 3 % noise.
 */
import { describe, expect, it } from 'vitest';
import { loveVelocities, type TwoLayer } from '../../../../core/dispersion/love-layer';
import { airyMinimum, OUTSIDE_SDS } from '../../../../core/estimate/estimate-diagnostics';
import { estimateLayer } from '../../../../core/estimate/estimate';
import { mulberry32 } from '../../../../core/shared/random';
import { INVENTED_SOFT_SITE, softSitePicks } from '../../../fixtures';

/** Lowest group velocity of the fundamental mode by two nested dense scans in ln f. */
function denseAiry(m: TwoLayer): number {
  let lo = Math.log((1e-2 * m.vs1) / m.h);
  let hi = Math.log((1e2 * m.vs1) / m.h);
  let best = Infinity;
  for (let pass = 0; pass < 3; pass++) {
    const n = 4000;
    let at = lo;
    for (let i = 0; i <= n; i++) {
      const x = lo + ((hi - lo) * i) / n;
      const u = loveVelocities(m, Math.exp(x), 0).group;
      if (u < best) {
        best = u;
        at = x;
      }
    }
    const step = (hi - lo) / n;
    lo = at - step;
    hi = at + step;
  }
  return best;
}

describe('the Airy minimum used by the diagnostics', () => {
  for (const m of [INVENTED_SOFT_SITE, { h: 30, vs1: 150, vs2: 900, rho1: 1700, rho2: 2200 }]) {
    it(`matches a dense scan of the closed-form group velocity (β2/β1 = ${m.vs2 / m.vs1})`, () => {
      const ref = denseAiry(m);
      const got = airyMinimum(m, 0);
      const tol = 1e-9 * ref;
      expect(Math.abs(got - ref), `expected ${ref} (dense scan), got ${got}, tolerance ${tol}`).toBeLessThanOrEqual(tol);
    });
  }
});

describe('picks near a bound with correctly stated noise', () => {
  it('are called impossible only when more than 3 sd beyond the bound (24 seeded runs)', () => {
    const rand = mulberry32(9031);
    let fired = 0;
    for (let run = 0; run < 24; run++) {
      const picks = softSitePicks(12, rand);
      const r = estimateLayer(picks, { vs2: 500 });
      const m: TwoLayer = { h: r.thickness.best, vs1: r.vs1.best, vs2: r.vs2.best, rho1: r.density1, rho2: r.density2 };
      const umin = denseAiry(m);
      const beyond = picks.map((p) => {
        const m3 = OUTSIDE_SDS * p.sd!;
        return p.kind === 'phase' ? p.velocity <= m.vs1 - m3 || p.velocity >= m.vs2 + m3 : p.velocity >= m.vs2 + m3 || p.velocity <= umin - m3;
      });
      const noted = r.diagnostics.outsideTrapping.map((o) => o.index);
      fired += noted.length > 0 ? 1 : 0;
      // Every pick named is beyond 3 sd by the dense-scan check, and every such pick is named.
      expect(noted, `run ${run}`).toEqual(beyond.flatMap((b, i) => (b ? [i] : [])));
    }
    // 3 % noise on 12 picks: a pick 3 sd beyond a bound is rare, so most runs must stay silent.
    expect(fired).toBeLessThanOrEqual(3);
  });
});
