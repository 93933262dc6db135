/**
 * Rayleigh waves in N layers (core/dispersion/rayleigh-stack.ts,
 * rayleigh-secular.ts): closed forms and limits.
 *
 * Sources beside each check:
 *  - Half-space: Rayleigh's equation, rationalised to the cubic
 *    ξ³ − 8ξ² + (24 − 16γ)ξ − 16(1 − γ) = 0, ξ = c²/β², γ = β²/α²
 *    (Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §5.1, with
 *    the cubic as in Stein & Wysession 2003, §2.7); at Poisson's ratio 1/4
 *    (α = √3 β) the closed form ξ = 2 − 2/√3, c = 0.9194017·β. The cubic is
 *    solved here by bisection, independently of the code under test.
 *  - Limits (closed forms of the above): low frequency → the half-space's
 *    Rayleigh speed; high frequency → the top layer's; a layer identical to
 *    the half-space → the half-space speed at every frequency, with U = c.
 *  - Splitting a layer into sublayers changes nothing (a homogeneous layer is
 *    its own sublayers).
 *  - Group velocity U = c / (1 − (f/c)·dc/df) (definition) with dc/df by a
 *    central difference of the solver's own phase velocity.
 * Models are invented for the tests.
 */
import { describe, expect, it } from 'vitest';
import type { LayeredModel } from '../../../../core/dispersion/model';
import {
  RayleighStackSolver,
  prepareRayleighStack,
  rayleighHalfspaceSpeed,
  rayleighSecular,
  rayleighStackGroupVelocity,
} from '../../../../core/dispersion/rayleigh-stack';
import {
  rayleighSecularDerivatives,
  rayleighSecularDerivativesReference,
  rayleighSecularSlope,
  secularScale,
  secularSlope,
} from '../../../../core/dispersion/rayleigh-secular';
import { mulberry32 } from '../../../../core/shared/random';
import { randomLayers } from '../../../fixtures';

/** Invented site: soft layer over stiffer ground, Poisson's ratio 1/3 in both. */
const twoLayer: LayeredModel = {
  layers: [{ thickness: 10, vs: 200, vp: 400, density: 1800 }],
  halfspace: { vs: 500, vp: 1000, density: 2000 },
};

/** Invented site with a stiff crust over a soft, low-velocity layer (a water table between them). */
const stiffCrust: LayeredModel = {
  layers: [
    { thickness: 4, vs: 300, vp: 600, density: 1900 },
    { thickness: 10, vs: 140, vp: 1500, density: 1800 },
    { thickness: 12, vs: 260, vp: 1600, density: 1900 },
  ],
  halfspace: { vs: 600, vp: 1800, density: 2100 },
};

function roots(model: LayeredModel, f: number, modes = 60): { c: Float64Array; solver: RayleighStackSolver } {
  const solver = new RayleighStackSolver(prepareRayleighStack(model));
  const out = new Float64Array(modes);
  const n = solver.solve(2 * Math.PI * f, modes, out);
  expect(solver.outcome.status).toBe('converged');
  return { c: out.slice(0, n), solver };
}

/** The physical root ξ in (0, 1) of the rationalised Rayleigh cubic, by bisection. */
function cubicRoot(gamma: number): number {
  const g = (xi: number) => xi * xi * xi - 8 * xi * xi + (24 - 16 * gamma) * xi - 16 * (1 - gamma);
  let lo = 0;
  let hi = 1;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (g(mid) < 0) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

function splitModel(model: LayeredModel, parts: number): LayeredModel {
  return {
    layers: model.layers.flatMap((l) => Array.from({ length: parts }, () => ({ ...l, thickness: l.thickness / parts }))),
    halfspace: model.halfspace,
  };
}

describe('half-space Rayleigh speed', () => {
  it('is √(2 − 2/√3)·β = 0.9194017·β at Poisson ratio 1/4 (closed form)', () => {
    const beta = 300;
    const want = Math.sqrt(2 - 2 / Math.sqrt(3)) * beta;
    const got = rayleighHalfspaceSpeed(beta, Math.sqrt(3) * beta);
    expect(Math.abs(got - want), `got ${got}, want ${want}`).toBeLessThan(1e-12 * want);
    expect(Math.abs(want / beta - 0.9194017)).toBeLessThan(5e-8);
  });

  it('solves the rationalised cubic for other Poisson ratios (cubic solved here by bisection)', () => {
    for (const nu of [-0.5, -0.1, 0, 0.1, 1 / 3, 0.4, 0.45, 0.49]) {
      const ratio = Math.sqrt((2 - 2 * nu) / (1 - 2 * nu)); // vp/vs
      const want = Math.sqrt(cubicRoot(1 / (ratio * ratio)));
      const got = rayleighHalfspaceSpeed(1, ratio);
      expect(Math.abs(got - want), `ν ${nu}: got ${got}, want ${want}`).toBeLessThan(1e-12);
    }
  });

  it('is NaN for vp/vs at or below √(4/3) (no stable solid)', () => {
    expect(rayleighHalfspaceSpeed(100, 100 * Math.sqrt(4 / 3))).toBeNaN();
    expect(rayleighHalfspaceSpeed(100, 100)).toBeNaN();
  });
});

describe('N-layer Rayleigh roots: limits', () => {
  it('a layer identical to the half-space gives the half-space speed at every frequency, as the only mode, with U = c', () => {
    const hs = { vs: 400, vp: 900, density: 2000 };
    const model: LayeredModel = { layers: [{ thickness: 7, ...hs }, { thickness: 30, ...hs }], halfspace: hs };
    const cR = rayleighHalfspaceSpeed(hs.vs, hs.vp);
    const s = prepareRayleighStack(model);
    for (const f of [0.05, 1, 10, 100, 2000]) {
      const { c, solver } = roots(model, f);
      expect(solver.outcome.complete).toBe(true);
      expect(c.length, `f ${f}: roots ${Array.from(c)}`).toBe(1);
      expect(Math.abs(c[0] - cR), `f ${f}: got ${c[0]}, want ${cR}`).toBeLessThan(1e-11 * cR);
      const u = rayleighStackGroupVelocity(s, 2 * Math.PI * f, c[0]);
      expect(Math.abs(u - cR), `f ${f}: U ${u}, want ${cR}`).toBeLessThan(1e-9 * cR);
    }
  });

  it('tends to the half-space Rayleigh speed at low frequency (error falling with f)', () => {
    const cR = rayleighHalfspaceSpeed(500, 1000);
    const e1 = Math.abs(roots(twoLayer, 0.1).c[0] - cR) / cR;
    const e2 = Math.abs(roots(twoLayer, 0.01).c[0] - cR) / cR;
    expect(e1).toBeLessThan(2e-2);
    expect(e2).toBeLessThan(2e-3);
    expect(e2).toBeLessThan(e1 / 5);
  });

  it('tends to the top layer’s own Rayleigh speed at high frequency (and stays finite: no overflow at kH ≈ 3e4)', () => {
    const cR1 = rayleighHalfspaceSpeed(200, 400);
    for (const f of [200, 1000, 100_000]) {
      const c0 = roots(twoLayer, f, 1).c[0];
      expect(Math.abs(c0 - cR1), `f ${f}: got ${c0}, want ${cR1}`).toBeLessThan(1e-9 * cR1);
    }
  });

  it('finds the same roots, every mode, when layers are split into sublayers', () => {
    for (const model of [twoLayer, stiffCrust]) {
      for (const f of [2, 9, 35]) {
        const a = roots(model, f).c;
        for (const parts of [2, 3]) {
          const b = roots(splitModel(model, parts), f).c;
          expect(b.length, `f ${f}, ${parts} parts`).toBe(a.length);
          for (let i = 0; i < a.length; i++) {
            expect(Math.abs(b[i] - a[i]), `f ${f}, mode ${i}: ${b[i]} vs ${a[i]}`).toBeLessThan(1e-10 * a[i]);
          }
        }
      }
    }
  });

  it('numbers the modes by order and changes sign of F across each root', () => {
    const s = prepareRayleighStack(stiffCrust);
    const w = 2 * Math.PI * 25;
    const { c } = roots(stiffCrust, 25);
    expect(c.length).toBeGreaterThan(3);
    for (let i = 0; i < c.length; i++) {
      if (i > 0) expect(c[i]).toBeGreaterThan(c[i - 1]);
      const lo = rayleighSecular(s, w, c[i] * (1 - 1e-9));
      const hi = rayleighSecular(s, w, c[i] * (1 + 1e-9));
      expect(lo * hi, `mode ${i} at ${c[i]}`).toBeLessThan(0);
    }
  });

  it('returns only the requested lowest modes, the same as the full set', () => {
    const all = roots(stiffCrust, 20).c;
    const two = roots(stiffCrust, 20, 2).c;
    expect(Array.from(two)).toEqual(Array.from(all.slice(0, 2)));
  });
});

describe('Rayleigh group velocity (implicit differentiation of the secular function)', () => {
  it('agrees with U = c / (1 − (f/c)·dc/df), dc/df by a central difference of the phase velocity', () => {
    for (const model of [twoLayer, stiffCrust]) {
      const s = prepareRayleighStack(model);
      for (const f of [1.5, 6, 18, 40]) {
        const { c } = roots(model, f, 4);
        const h = 1e-4 * f;
        const up = roots(model, f + h, 4).c;
        const down = roots(model, f - h, 4).c;
        for (let m = 0; m < c.length && m < up.length && m < down.length; m++) {
          const dcdf = (up[m] - down[m]) / (2 * h);
          const want = c[m] / (1 - (f / c[m]) * dcdf);
          const got = rayleighStackGroupVelocity(s, 2 * Math.PI * f, c[m]);
          // Central-difference error O(h²) plus rounding ~1e-14·c/h: about 1e-7 relative here.
          expect(Math.abs(got - want), `f ${f}, mode ${m}: got ${got}, want ${want}`).toBeLessThan(1e-6 * Math.abs(want));
        }
      }
    }
  });
});

/**
 * A seeded random case for the secular-function checks: randomLayers over a
 * half-space 20–620 m/s faster than the slowest layer (Vp = 2 Vs, 2000 kg/m³),
 * ω log-uniform from 2π·0.5 to 2π·0.5·span rad/s, c from 0.3 to 0.99 of the
 * half-space Vs. Draws from `rand` in a fixed order.
 */
function randomSecularCase(rand: () => number, span: number) {
  const layers = randomLayers(rand);
  const vsH = Math.min(...layers.map((l) => l.vs)) + 20 + rand() * 600;
  const s = prepareRayleighStack({ layers, halfspace: { vs: vsH, vp: 2 * vsH, density: 2000 } });
  const omega = 2 * Math.PI * 0.5 * Math.pow(span, rand());
  const c = vsH * (0.3 + 0.69 * rand());
  return { layers, s, omega, c };
}

describe('fast derivatives of the secular function (five-minor step)', () => {
  it('agree with forward differentiation of the plain six-minor form on 150 seeded random models (F_c/F and F_k/F, scale-free)', () => {
    const rand = mulberry32(7);
    for (let t = 0; t < 150; t++) {
      const { layers, s, omega, c } = randomSecularCase(rand, 120);
      const ref = rayleighSecularDerivativesReference(s, omega, c, { value: 0, dc: 0, dk: 0 });
      const fast = rayleighSecularDerivatives(s, omega, c);
      const ctx = `case ${t}: c ${c}, ω ${omega}, ${JSON.stringify(layers)}`;
      // Both carry F times a positive factor held fixed in the derivatives, so the ratios are comparable.
      expect(Math.abs(fast.dc / fast.value / (ref.dc / ref.value) - 1), ctx).toBeLessThan(1e-8);
      expect(Math.abs(fast.dk / fast.value / (ref.dk / ref.value) - 1), ctx).toBeLessThan(1e-8);
      // The value path writes the same matrix with its coefficients arranged for speed: equal up to rounding,
      // amplified by (β/c)⁴ in layers much stiffer than c (header of rayleigh-secular.ts).
      const amplification = Math.max(1, (Math.max(...layers.map((l) => l.vs)) / c) ** 4);
      expect(Math.abs(rayleighSecular(s, omega, c) / fast.value - 1), ctx).toBeLessThan(1e-12 * amplification);
      // The scan's slope (value and dF/dc along the scan at fixed ω, written out in locals): dF/dc = F_c − (k/c)·F_k.
      const slope = rayleighSecularSlope(s, omega, c, { value: 0, dc: 0, dk: 0 });
      expect(Math.abs(slope.value / fast.value - 1), ctx).toBeLessThan(1e-12 * amplification);
      const k = omega / c;
      const along = (ref.dc - (k / c) * ref.dk) / ref.value;
      // Relative to the larger of the two terms (they may cancel).
      const size = Math.max(Math.abs(ref.dc), Math.abs((k / c) * ref.dk)) / Math.abs(ref.value);
      expect(Math.abs(slope.dc / slope.value - along) / size, ctx).toBeLessThan(1e-8);
    }
  });

  it('give the slope of ln|F̃| along the scan (fixed ω) that the root scan reads, as a central difference does (30 seeded models)', () => {
    const rand = mulberry32(11);
    const lnF = (s: ReturnType<typeof prepareRayleighStack>, omega: number, c: number) =>
      Math.log(Math.abs(rayleighSecular(s, omega, c))) + secularScale.exponent * Math.LN2;
    let checked = 0;
    for (let t = 0; t < 30; t++) {
      const { layers, s, omega, c } = randomSecularCase(rand, 60);
      // Away from a wave speed (ln of the scale has a square-root kink there) and from a root of F.
      const speeds = layers.flatMap((l) => [l.vs, l.vp]);
      if (speeds.some((v) => Math.abs(c / v - 1) < 1e-3)) continue;
      const d = rayleighSecularSlope(s, omega, c, { value: 0, dc: 0, dk: 0 });
      const got = d.dc / d.value + secularSlope.scale;
      const h = 1e-6 * c;
      // Fourth-order central difference: truncation about h⁴ times the fifth derivative, far below the tolerance.
      const num = (8 * (lnF(s, omega, c + h) - lnF(s, omega, c - h)) - (lnF(s, omega, c + 2 * h) - lnF(s, omega, c - 2 * h))) / (12 * h);
      if (Math.abs(got) * c > 1e4) continue; // beside a root: ln|F| is too steep for the difference
      // Tolerance: rounding of ln|F| (about 1e-12 relative to F, amplified by (β/c)⁴ in layers much stiffer than c) over h.
      const amplification = Math.max(1, (Math.max(...layers.map((l) => l.vs)) / c) ** 4);
      const tol = (1e-11 * amplification) / h + 1e-6 * Math.abs(got);
      expect(Math.abs(got - num), `case ${t}: c ${c}, ω ${omega}: slope ${got}, difference ${num}, tol ${tol}`).toBeLessThan(tol);
      checked++;
    }
    expect(checked).toBeGreaterThan(20);
  });
});
