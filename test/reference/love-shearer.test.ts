/**
 * The crustal layer over mantle of Shearer, *Introduction to Seismology*
 * (2nd ed. 2009), ch. 8 exercises: H = 40 km, β1 = 3.5 km/s, β2 = 4.5 km/s,
 * ρ1 = 2.7 g/cm³, ρ2 = 3.3 g/cm³. The exercise asks for the fundamental-mode
 * period at c = 3.8, 4.0, 4.2 and 4.4 km/s; the answers here come from the
 * explicit branch form (closed form, Aki & Richards 2nd ed. §7.2), and the
 * three routes of core must agree with it:
 *   - the branch form ω_n(c) (love-layer.ts, closed form);
 *   - the one-layer root finders (Brent, and warm-started Newton in φ);
 *   - the N-layer Thomson–Haskell solver with the layer split into sublayers.
 * Tolerance 1e-9 relative (the figure; the solvers reach ~1e-15).
 */
import { describe, expect, it } from 'vitest';
import { logBand, loveCurves, loveCutoffFrequencies } from '../../core/dispersion/curve';
import { loveStackGroupVelocity } from '../../core/dispersion/group-velocity';
import {
  loveBranchOmega,
  loveCutoffHz,
  loveGroupVelocityAt,
  loveModeCount,
  lovePeriodEquationResidual,
  lovePhaseResidual,
  lovePhaseVelocityNear,
  lovePhaseVelocitySolve,
  type TwoLayer,
} from '../../core/dispersion/love-layer';
import { LoveStackSolver, loveModesBelow, loveSecular, loveStackCutoff, prepareLoveStack } from '../../core/dispersion/love-stack';
import type { LayeredModel } from '../../core/dispersion/model';
import { SHEARER_CRUST, SHEARER_CRUST_MODEL } from '../fixtures';

/** Shearer's crust over mantle (test/fixtures.ts; values and source in the header above). */
const P: TwoLayer = SHEARER_CRUST;
const oneLayer: LayeredModel = SHEARER_CRUST_MODEL;
/** The same model with the layer cut into 7 + 13 + 20 km sublayers. */
const split: LayeredModel = {
  layers: [
    { thickness: 7_000, vs: 3500, density: 2700 },
    { thickness: 13_000, vs: 3500, density: 2700 },
    { thickness: 20_000, vs: 3500, density: 2700 },
  ],
  halfspace: { vs: 4500, density: 3300 },
};
const stack = prepareLoveStack(split);
const TOL = 1e-9;

function near(got: number, want: number, tol: number, what: string): void {
  const rel = Math.abs(got / want - 1);
  expect(rel, `${what}: expected ${want}, got ${got}, rel. diff ${rel}, tol ${tol}`).toBeLessThanOrEqual(tol);
}

describe("Shearer's crust over mantle: branch form, root finders and propagator agree", () => {
  const speeds = [3800, 4000, 4200, 4400];
  for (const n of [0, 1, 2]) {
    for (const c of speeds) {
      it(`mode ${n} at c = ${c / 1000} km/s`, () => {
        const omega = loveBranchOmega(P, c, n); // closed form
        const f = omega / (2 * Math.PI);
        const brentRoot = lovePhaseVelocitySolve(P, f, n);
        expect(brentRoot.status).toBe('converged');
        near(brentRoot.x, c, TOL, 'Brent on the period equation');
        const newton = lovePhaseVelocityNear(P, f, n, NaN);
        expect(newton.status).toBe('converged');
        near(newton.x, c, TOL, 'safeguarded Newton in φ');
        const solver = new LoveStackSolver(stack);
        const roots = new Float64Array(n + 1);
        expect(solver.solve(omega, n + 1, roots)).toBe(n + 1);
        expect(solver.outcome.status).toBe('converged');
        near(roots[n], c, TOL, 'Thomson–Haskell, layer split in three');
        // Residuals vanish at every root.
        expect(Math.abs(lovePhaseResidual(P, omega, c, n))).toBeLessThan(1e-12);
        const x = omega * P.h * Math.sqrt(1 / P.vs1 ** 2 - 1 / c ** 2);
        const rhs = (P.rho2 * P.vs2 ** 2 * Math.sqrt(1 / c ** 2 - 1 / P.vs2 ** 2)) / (P.rho1 * P.vs1 ** 2 * Math.sqrt(1 / P.vs1 ** 2 - 1 / c ** 2));
        // tan's slope is (1 + tan²)·x per relative change in x: tolerance follows from 1e-14 in x.
        expect(Math.abs(lovePeriodEquationResidual(P, f, brentRoot.x))).toBeLessThan(1e-14 * (1 + rhs * rhs) * x * 10);
        expect(solver.outcome.worstResidual).toBeLessThan(1e-12);
        // Group velocity: closed form (one layer) vs energy integrals over the split stack.
        near(loveStackGroupVelocity(stack, omega, roots[n]), loveGroupVelocityAt(P, f, c), TOL, 'group velocity');
      });
    }
  }

  it('fundamental-mode periods at 3.8, 4.0, 4.2 and 4.4 km/s decrease with c falling (the exercise)', () => {
    const periods = speeds.map((c) => (2 * Math.PI) / loveBranchOmega(P, c, 0));
    for (let i = 1; i < periods.length; i++) expect(periods[i]).toBeGreaterThan(periods[i - 1]);
    // Each period, fed back as a frequency, returns its speed through the whole curve API.
    const curves = loveCurves(split, periods.map((t) => 1 / t));
    const sorted = [...speeds].reverse(); // ascending frequency = descending c
    sorted.forEach((c, i) => near(curves.modes[0].phase[i], c, TOL, `curve at T = ${1 / curves.modes[0].frequency[i]} s`));
  });

  it('the curve API gives the same columns for the one-layer model and its split copy', () => {
    const band = logBand(0.002, 2, 300);
    const a = loveCurves(oneLayer, band, { modes: 6 });
    const b = loveCurves(split, band, { modes: 6 });
    for (let m = 0; m < 6; m++) {
      expect(b.modes[m].phase.length, `mode ${m} point count`).toBe(a.modes[m].phase.length);
      for (let i = 0; i < a.modes[m].phase.length; i++) {
        near(b.modes[m].phase[i], a.modes[m].phase[i], TOL, `mode ${m} phase at ${a.modes[m].frequency[i]} Hz`);
        near(b.modes[m].group[i], a.modes[m].group[i], TOL, `mode ${m} group at ${a.modes[m].frequency[i]} Hz`);
      }
    }
  });
});

describe("Shearer's crust over mantle: cutoffs", () => {
  it('cutoffs of the propagator match the closed form f_n = n β1 β2 / (2H √(β2² − β1²))', () => {
    for (let n = 1; n <= 6; n++) {
      const closed = (n * 3500 * 4500) / (2 * 40_000 * Math.sqrt(4500 ** 2 - 3500 ** 2));
      near(loveCutoffHz(P, n), closed, 1e-15, `closed form, mode ${n}`);
      const r = loveStackCutoff(stack, n);
      expect(r.status).toBe('converged');
      near(r.frequency, closed, TOL, `propagator cutoff, mode ${n}`);
      // The count of modes present steps from n to n + 1 across the cutoff.
      expect(loveModesBelow(stack, 2 * Math.PI * closed * (1 - 1e-9), 4500)).toBe(n);
      expect(loveModesBelow(stack, 2 * Math.PI * closed * (1 + 1e-9), 4500)).toBe(n + 1);
      // At the cutoff the secular function at c = β_H vanishes.
      const tauScale = (stack.muH * 2 * Math.PI * closed) / 4500;
      expect(Math.abs(loveSecular(stack, 2 * Math.PI * r.frequency, 4500)) / tauScale).toBeLessThan(1e-9);
    }
    const viaCurve = loveCutoffFrequencies(split, 4);
    const closedCurve = loveCutoffFrequencies(oneLayer, 4);
    expect(viaCurve[0]).toBe(0);
    expect(closedCurve[0]).toBe(0);
    for (let n = 1; n < 4; n++) near(viaCurve[n], closedCurve[n], TOL, `loveCutoffFrequencies mode ${n}`);
  });

  it('mode count = floor(f/f1) + 1 (closed form, PHYSICS.md §2)', () => {
    const f1 = loveCutoffHz(P, 1);
    for (const f of logBand(0.001, 1, 400)) {
      const want = Math.floor(f / f1) + 1;
      expect(loveModeCount(P, f), `one-layer count at ${f} Hz`).toBe(want);
      expect(loveModesBelow(stack, 2 * Math.PI * f, 4500), `propagator count at ${f} Hz`).toBe(want);
    }
  });
});

describe("Shearer's crust over mantle: limits and the Airy phase", () => {
  it('c and U tend to β2 at low frequency (fundamental) and at each overtone cutoff', () => {
    const low = lovePhaseVelocitySolve(P, 1e-4, 0).x;
    expect(1 - low / 4500).toBeLessThan(1e-5);
    expect(1 - lovePhaseVelocitySolve(P, 1e-3, 0).x / 4500).toBeGreaterThan(1 - low / 4500);
    expect(1 - loveGroupVelocityAt(P, 1e-4, low) / 4500).toBeLessThan(1e-5);
    for (let n = 1; n <= 3; n++) {
      const f = loveCutoffHz(P, n) * (1 + 1e-6);
      const c = lovePhaseVelocitySolve(P, f, n).x;
      expect(1 - c / 4500, `mode ${n} phase just above cutoff`).toBeLessThan(1e-8);
      expect(1 - loveGroupVelocityAt(P, f, c) / 4500, `mode ${n} group just above cutoff`).toBeLessThan(1e-4);
    }
  });

  it('c and U tend to β1 at high frequency, the gap shrinking about as 1/f²', () => {
    for (const n of [0, 1, 2]) {
      const gap = (f: number) => lovePhaseVelocitySolve(P, f, n).x / 3500 - 1;
      expect(gap(20), `mode ${n} at 20 Hz`).toBeLessThan(1e-5 * (n + 1) ** 2); // the gap grows as (n + ½)² (closed form asymptote)
      expect(gap(20)).toBeGreaterThan(0);
      expect(gap(5) / gap(20), `mode ${n} gap ratio 5 Hz / 20 Hz`).toBeGreaterThan(10);
      const c = lovePhaseVelocitySolve(P, 20, n).x;
      expect(Math.abs(loveGroupVelocityAt(P, 20, c) / 3500 - 1)).toBeLessThan(1e-5 * (n + 1) ** 2);
    }
  });

  it('the fundamental mode has a group-velocity minimum (Airy phase) below β1, inside the band', () => {
    const band = logBand(0.005, 1, 2000);
    for (const model of [oneLayer, split]) {
      const g = loveCurves(model, band).modes[0].group;
      let im = 0;
      for (let i = 1; i < g.length; i++) if (g[i] < g[im]) im = i;
      expect(im).toBeGreaterThan(0);
      expect(im).toBeLessThan(g.length - 1);
      expect(g[im]).toBeLessThan(3500);
      expect(g[0]).toBeGreaterThan(g[im]);
      expect(g[g.length - 1]).toBeGreaterThan(g[im]);
    }
  });
});
