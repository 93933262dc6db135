/**
 * Group velocity from the energy integrals (Aki & Richards, *Quantitative
 * Seismology*, 2nd ed. 2002, §7.3; closed form per layer) against a
 * high-accuracy numerical dω/dk: central differences of k(ω) = ω/c(ω) from
 * the root solvers at ω(1 ± δ) and ω(1 ± δ/2), Richardson-extrapolated
 * (error O(δ⁴)), δ = 1e-3. With roots good to ~1e-15 the reference is good
 * to ~1e-11; tolerance 1e-9 relative. Models are invented, except Shearer's
 * crust (*Introduction to Seismology*, ch. 8 exercises).
 */
import { describe, expect, it } from 'vitest';
import { loveStackGroupVelocity } from '../../../../core/dispersion/group-velocity';
import { loveGroupVelocityAt, lovePhaseVelocitySolve, type TwoLayer } from '../../../../core/dispersion/love-layer';
import { LoveStackSolver, prepareLoveStack, type LoveStack } from '../../../../core/dispersion/love-stack';
import type { LayeredModel } from '../../../../core/dispersion/model';
import { INVENTED_FIVE_LAYER_SITE, SHEARER_CRUST } from '../../../fixtures';

function stackRoot(s: LoveStack, omega: number, n: number): number {
  const solver = new LoveStackSolver(s);
  const out = new Float64Array(n + 1);
  expect(solver.solve(omega, n + 1, out)).toBe(n + 1);
  expect(solver.outcome.status).toBe('converged');
  return out[n];
}

/** dω/dk by Richardson-extrapolated central differences of k(ω) = ω/c(ω). */
function numericalGroup(phase: (omega: number) => number, omega: number, delta = 1e-3): number {
  const d = (h: number) => {
    const wp = omega * (1 + h);
    const wm = omega * (1 - h);
    return (wp - wm) / (wp / phase(wp) - wm / phase(wm));
  };
  return (4 * d(delta / 2) - d(delta)) / 3;
}

function near(got: number, want: number, what: string): void {
  const rel = Math.abs(got / want - 1);
  expect(rel, `${what}: numerical ${want}, energy integrals ${got}, rel. diff ${rel}, tol 1e-9`).toBeLessThanOrEqual(1e-9);
}

/** Shearer's crust (*Introduction to Seismology*, 2nd ed. 2009, ch. 8 exercises). */
const shearer: TwoLayer = SHEARER_CRUST;

/** Invented five-layer site. */
const fiveLayer: LayeredModel = INVENTED_FIVE_LAYER_SITE;

/** A fast layer over a slow one: the top layer is evanescent for the trapped modes. */
const fastOverSlow: LayeredModel = {
  layers: [
    { thickness: 4, vs: 500, density: 2000 },
    { thickness: 20, vs: 200, density: 1800 },
  ],
  halfspace: { vs: 800, density: 2200 },
};

describe('group velocity from the energy integrals matches a high-accuracy numerical dω/dk', () => {
  it('one layer, closed form (Shearer crust), modes 0–3', () => {
    for (const n of [0, 1, 2, 3]) {
      for (const f of [0.02, 0.05, 0.1, 0.3, 1]) {
        const c = lovePhaseVelocitySolve(shearer, f, n).x;
        if (Number.isNaN(c)) continue;
        const num = numericalGroup((w) => lovePhaseVelocitySolve(shearer, w / (2 * Math.PI), n).x, 2 * Math.PI * f);
        near(loveGroupVelocityAt(shearer, f, c), num, `mode ${n} at ${f} Hz`);
      }
    }
  });

  for (const [name, model] of [
    ['five layers with a low-velocity layer', fiveLayer],
    ['a fast layer over a slow one (evanescent top layer)', fastOverSlow],
  ] as const) {
    it(`N layers: ${name}, modes 0–3`, () => {
      const s = prepareLoveStack(model);
      for (const n of [0, 1, 2, 3]) {
        for (const f of [4, 9, 20, 45]) {
          const omega = 2 * Math.PI * f;
          const solver = new LoveStackSolver(s);
          if (solver.solve(omega, n + 1, new Float64Array(n + 1)) < n + 1) continue;
          if (solver.outcome.present < n + 1) continue;
          const c = stackRoot(s, omega, n);
          const u = loveStackGroupVelocity(s, omega, c);
          near(u, numericalGroup((w) => stackRoot(s, w, n), omega), `mode ${n} at ${f} Hz`);
          expect(u).toBeGreaterThan(0);
          expect(u).toBeLessThanOrEqual(c * (1 + 1e-12)); // U ≤ c for Love waves (energy integrals)
        }
      }
    });
  }

  it('stays accurate when c is within 1e-9 of a layer speed (series branch of the integrals)', () => {
    // Choose f so that mode 0 sits just above β of the second layer: solve for ω at c = 220·(1 + 1e-9)
    // by bisection on the root, then check the energy integrals against the split stack.
    const s = prepareLoveStack(fiveLayer);
    const target = 220 * (1 + 1e-9);
    let lo = 2 * Math.PI * 1;
    let hi = 2 * Math.PI * 200;
    for (let i = 0; i < 200; i++) {
      const mid = 0.5 * (lo + hi);
      if (stackRoot(s, mid, 0) > target) lo = mid;
      else hi = mid;
    }
    const omega = 0.5 * (lo + hi);
    const c = stackRoot(s, omega, 0);
    expect(Math.abs(c / 220 - 1)).toBeLessThan(1e-8);
    near(loveStackGroupVelocity(s, omega, c), numericalGroup((w) => stackRoot(s, w, 0), omega), 'mode 0 with c ≈ β2');
  });

  it('gives β_H at c = β_H and NaN above it (outside the domain)', () => {
    const s = prepareLoveStack(fiveLayer);
    expect(loveStackGroupVelocity(s, 10, 700)).toBe(700);
    expect(loveStackGroupVelocity(s, 10, 701)).toBeNaN();
  });

  it('agrees with the one-layer closed form for a one-layer stack', () => {
    const s = prepareLoveStack({ layers: [{ thickness: 40_000, vs: 3500, density: 2700 }], halfspace: { vs: 4500, density: 3300 } });
    for (const f of [0.01, 0.04, 0.2]) {
      const c = lovePhaseVelocitySolve(shearer, f, 0).x;
      near(loveStackGroupVelocity(s, 2 * Math.PI * f, c), loveGroupVelocityAt(shearer, f, c), `${f} Hz`);
    }
  });
});
