/**
 * A single phase pick with known speeds and densities fixes the layer
 * thickness in closed form: the branch form of the Love period equation
 * turned around (shared/PHYSICS.md §2; Aki & Richards, *Quantitative
 * Seismology*, 2nd ed. 2002, §7.2):
 *
 *   H = [arctan(μ2η2 / (μ1η1)) + nπ] / (ω η1),
 *   η1 = √(1/β1² − 1/c²), η2 = √(1/c² − 1/β2²), μ = ρβ².
 *
 * Here it is written out in the test itself (an independent evaluation of
 * the formula), checked against love-layer.ts loveThicknessFromPhasePick,
 * and the estimate must agree with both. The pick values are invented.
 */
import { describe, expect, it } from 'vitest';
import { estimateLayer } from '../../core/estimate/estimate';
import { loveThicknessFromPhasePick } from '../../core/dispersion/love-layer';

function closedFormH(f: number, c: number, b1: number, b2: number, r1: number, r2: number, n: number): number {
  const eta1 = Math.sqrt(1 / (b1 * b1) - 1 / (c * c));
  const eta2 = Math.sqrt(1 / (c * c) - 1 / (b2 * b2));
  const mu1 = r1 * b1 * b1;
  const mu2 = r2 * b2 * b2;
  return (Math.atan((mu2 * eta2) / (mu1 * eta1)) + n * Math.PI) / (2 * Math.PI * f * eta1);
}

describe('single phase pick, speeds known: the estimate equals the closed-form thickness', () => {
  const cases = [
    // f (Hz), c (m/s), β1, β2, ρ1, ρ2, mode: invented soil-site values.
    { f: 8, c: 260, b1: 200, b2: 500, r1: 1800, r2: 2100, n: 0 },
    { f: 2.5, c: 410, b1: 180, b2: 650, r1: 1700, r2: 2200, n: 0 },
    { f: 20, c: 330, b1: 250, b2: 400, r1: 1900, r2: 2000, n: 1 },
  ];
  for (const k of cases) {
    it(`f = ${k.f} Hz, c = ${k.c} m/s, β1 = ${k.b1}, β2 = ${k.b2}, mode ${k.n}`, () => {
      const want = closedFormH(k.f, k.c, k.b1, k.b2, k.r1, k.r2, k.n);
      const lib = loveThicknessFromPhasePick({ vs1: k.b1, vs2: k.b2, rho1: k.r1, rho2: k.r2 }, k.f, k.c, k.n);
      expect(Math.abs(lib - want) / want).toBeLessThan(1e-13);
      const r = estimateLayer([{ frequency: k.f, velocity: k.c, kind: 'phase', mode: k.n }], {
        vs1: k.b1,
        vs2: k.b2,
        density1: k.r1,
        density2: k.r2,
        thicknessRange: [want / 20, want * 20],
      });
      const got = r.thickness.best;
      const diff = Math.abs(got - want) / want;
      // Tolerance: the estimate stops at a zero residual found to ~1e-12 in log H.
      if (!(diff <= 1e-9)) throw new Error(`H: expected ${want}, got ${got}, relative difference ${diff} > 1e-9`);
      expect(r.alternatives).toHaveLength(1);
      expect(r.dof).toBe(0);
      // One pick and one parameter: the 68 % interval is the ±1σ interval, σ_c = 3 % of c (default).
      expect(r.thickness.low68).toBeLessThan(want);
      expect(r.thickness.high68).toBeGreaterThan(want);
      const hLow = closedFormH(k.f, k.c * 1.03, k.b1, k.b2, k.r1, k.r2, k.n);
      const hHigh = closedFormH(k.f, k.c * 0.97, k.b1, k.b2, k.r1, k.r2, k.n);
      // Δχ² = 1 ⇔ the predicted c moves by one σ: the same closed form at c ± σ (H falls as c rises).
      expect(Math.abs(r.thickness.low68 - Math.min(hLow, hHigh)) / want).toBeLessThan(1e-5);
      expect(Math.abs(r.thickness.high68 - Math.max(hLow, hHigh)) / want).toBeLessThan(1e-5);
    });
  }
});
