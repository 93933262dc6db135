/**
 * One layer over a half-space just above a cutoff (issue 9 §5): the mode
 * count and the root search agree, and the phase velocity there is β2, the
 * limit c → β2 as f → f_n⁺ (shared/PHYSICS.md §2: the branch form at
 * c = β2; Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §7.2).
 * Cutoffs f_n = nβ1β2 / (2H√(β2² − β1²)) (closed form). Models: Shearer's
 * crust (*Introduction to Seismology*, 2nd ed., ch. 8 exercises) and the
 * invented soft site.
 */
import { describe, expect, it } from 'vitest';
import { loveCurves } from '../../../../core/dispersion/curve';
import { loveCutoffHz, loveModeCount, lovePhaseVelocityNear, lovePhaseVelocitySolve, type TwoLayer } from '../../../../core/dispersion/love-layer';
import { INVENTED_SOFT_SITE, SHEARER_CRUST } from '../../../fixtures';

/** The next double above x > 0. */
function nextUp(x: number): number {
  const b = new Float64Array([x]);
  const i = new BigInt64Array(b.buffer);
  i[0] += 1n;
  return b[0];
}

describe('a frequency one rounding unit above a cutoff', () => {
  for (const [name, p] of [
    ['Shearer crust', SHEARER_CRUST],
    ['invented soft site', INVENTED_SOFT_SITE],
  ] as [string, TwoLayer][]) {
    it(`${name}: modes 1–9 exist by the count and their phase velocity is β2 to rounding, never bracket-lost`, () => {
      for (let n = 1; n <= 9; n++) {
        const f = nextUp(loveCutoffHz(p, n));
        expect(loveModeCount(p, f), `mode count at f_${n}⁺`).toBe(n + 1);
        for (const r of [lovePhaseVelocitySolve(p, f, n), lovePhaseVelocityNear(p, f, n, NaN)]) {
          expect(r.status, `mode ${n} at ${f} Hz`).toBe('converged');
          expect(Math.abs(r.x / p.vs2 - 1), `mode ${n}: expected β2 = ${p.vs2}, got ${r.x}`).toBeLessThan(1e-12);
        }
        const model = { layers: [{ thickness: p.h, vs: p.vs1, density: p.rho1 }], halfspace: { vs: p.vs2, density: p.rho2 } };
        expect(loveCurves(model, [f], { modes: n + 1 }).failures).toEqual([]);
      }
    });
  }
  it('exactly at a cutoff the mode is not counted and the search says so', () => {
    const p = INVENTED_SOFT_SITE;
    const f = loveCutoffHz(p, 2);
    expect(loveModeCount(p, f)).toBe(2);
    expect(lovePhaseVelocitySolve(p, f, 2).status).toBe('bracket-lost');
  });
});
