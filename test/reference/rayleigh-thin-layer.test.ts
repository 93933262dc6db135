/**
 * Rayleigh phase and group velocities of the compound-matrix root finder
 * (core/dispersion/rayleigh-stack.ts) against an independent method run
 * here: the thin-layer method for P-SV (Lysmer 1970, BSSA 60:89–104;
 * Kausel & Roësset 1981, BSSA 71:1743) as a generalized eigenproblem solved
 * with ml-matrix (test/reference/thin-layer-psv.ts), whose group velocity
 * comes from the energy form U = vᵀ(2kA + B)v / (2ω vᵀMv).
 *
 * The thin-layer error falls as (h/λ)² (consistent mass): the test runs two
 * meshes, h and h/2, checks that the error falls by a factor near 4, and
 * compares the root finder with the Richardson extrapolation
 * (4·c(h/2) − c(h))/3, within a tenth of the step c(h) − c(h/2) (the
 * extrapolated error is O(h⁴); the fixed base, 4 half-space wavelengths
 * below the layers, adds less for modes below 0.9·β_H). Modes within 10 % of β_H are left out (they reach the fixed base).
 * Models are invented: a soft layer over stiffer ground, a stiff crust over
 * a soft low-velocity layer, and a three-layer site with a buried
 * low-velocity layer.
 */
import { describe, expect, it } from 'vitest';
import type { LayeredModel } from '../../core/dispersion/model';
import { RayleighStackSolver, prepareRayleighStack, rayleighStackGroupVelocity } from '../../core/dispersion/rayleigh-stack';
import { thinLayerRayleighModes, type PsvModel } from './thin-layer-psv';

interface Case {
  name: string;
  model: LayeredModel & PsvModel;
  f: number;
  h: number;
}

const cases: Case[] = [
  {
    name: 'soft layer over stiffer ground',
    model: { layers: [{ thickness: 10, vs: 200, vp: 400, density: 1800 }], halfspace: { vs: 400, vp: 800, density: 2000 } },
    f: 20,
    h: 0.5,
  },
  {
    name: 'stiff crust over a soft low-velocity layer',
    model: {
      layers: [
        { thickness: 4, vs: 300, vp: 600, density: 1900 },
        { thickness: 10, vs: 140, vp: 1500, density: 1800 },
        { thickness: 12, vs: 260, vp: 1600, density: 1900 },
      ],
      halfspace: { vs: 600, vp: 1800, density: 2100 },
    },
    f: 6,
    h: 1,
  },
  {
    name: 'three layers with a buried low-velocity layer',
    model: {
      layers: [
        { thickness: 10, vs: 250, vp: 600, density: 1800 },
        { thickness: 15, vs: 150, vp: 1500, density: 1750 },
        { thickness: 20, vs: 350, vp: 1600, density: 1900 },
      ],
      halfspace: { vs: 600, vp: 1800, density: 2100 },
    },
    f: 4,
    h: 1,
  },
];

describe('Rayleigh roots and group velocity against the thin-layer method (P-SV)', () => {
  for (const { name, model, f, h } of cases) {
    it(`agree for ${name} at ${f} Hz, every mode below 0.9·β_H, with the thin-layer error falling as h²`, () => {
      const stack = prepareRayleighStack(model);
      const solver = new RayleighStackSolver(stack);
      const out = new Float64Array(40);
      const omega = 2 * Math.PI * f;
      const n = solver.solve(omega, 40, out);
      expect(solver.outcome.status).toBe('converged');
      const roots = Array.from(out.subarray(0, n)).filter((c) => c < 0.9 * model.halfspace.vs);
      expect(roots.length).toBeGreaterThan(1);
      const depth = 4 * (model.halfspace.vs / f) + model.layers.reduce((s, l) => s + l.thickness, 0);
      const coarse = thinLayerRayleighModes(model, f, { h, growth: 1.2, depth });
      const fine = thinLayerRayleighModes(model, f, { h, growth: 1.2, depth, split: 2 });
      for (let m = 0; m < roots.length; m++) {
        const c = roots[m];
        const c1 = coarse[m].phase;
        const c2 = fine[m].phase;
        const extrap = (4 * c2 - c1) / 3;
        const tol = 0.1 * Math.abs(c1 - c2) + 1e-9 * c;
        expect(Math.abs(c - extrap), `mode ${m}: root ${c}, thin-layer ${c1} (h), ${c2} (h/2), extrapolated ${extrap}, tolerance ${tol}`).toBeLessThan(tol);
        // Consistent mass: c comes out high, and the error falls by about 4 when h halves.
        const ratio = (c1 - c) / (c2 - c);
        expect(c1 > c && c2 > c && ratio > 3 && ratio < 5, `mode ${m}: error ratio ${ratio}`).toBe(true);
        const u = rayleighStackGroupVelocity(stack, omega, c);
        const u1 = coarse[m].group;
        const u2 = fine[m].group;
        const uExtrap = (4 * u2 - u1) / 3;
        const uTol = 0.15 * Math.abs(u1 - u2) + 1e-7 * u;
        expect(Math.abs(u - uExtrap), `mode ${m}: U ${u}, thin-layer energy form ${u1} (h), ${u2} (h/2), extrapolated ${uExtrap}, tolerance ${uTol}`).toBeLessThan(uTol);
      }
    }, 120_000);
  }
});
