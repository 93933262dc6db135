/**
 * No Rayleigh mode skipped and none invented, against an independent
 * method on seeded random models: the thin-layer method for P-SV (Lysmer
 * 1970, BSSA 60:89–104; Kausel & Roësset 1981, BSSA 71:1743), a
 * generalized eigenproblem solved with ml-matrix (test/reference/
 * thin-layer-psv.ts), gives every mode at once, with no root search at all.
 *
 * For each model and frequency, the roots of the compound-matrix solver
 * (rayleigh-stack.ts, default careful mode) and the thin-layer modes below a
 * cut near 0.9·β_H (moved down into a gap so that no root of either lies
 * within 3 % of it; the fixed base of the thin-layer mesh disturbs modes
 * near β_H) must be equal in number and agree in order within the
 * thin-layer error: consistent mass puts its speeds high by O((h/λ)²), here
 * h = λ/16 of the slowest shear wave, a few per cent for the higher modes
 * (shorter vertical wavelengths), so the bound is 5 % above and 0.2 % below.
 * vp/vs is kept from 1.6 to 3: linear elements lock in nearly
 * incompressible layers (a known property of low-order finite elements, from
 * memory) and would need far finer meshes. The accuracy itself is checked by
 * Richardson extrapolation in rayleigh-thin-layer.test.ts. Models: 1–4
 * layers, seeded (mulberry32), half of them a stiff crust over a soft
 * low-velocity layer.
 */
import { describe, expect, it } from 'vitest';
import type { LayeredModel } from '../../core/dispersion/model';
import { RayleighStackSolver, prepareRayleighStack } from '../../core/dispersion/rayleigh-stack';
import { mulberry32 } from '../../core/shared/random';
import { thinLayerRayleighModes, type PsvModel } from './thin-layer-psv';

function randomModel(rand: () => number, lvl: boolean): LayeredModel & PsvModel {
  const vpOf = (vs: number) => vs * (1.6 + rand() * 1.4);
  const layers = [];
  if (lvl) {
    // Stiff crust over a soft layer, then stiffer ground.
    const crust = 250 + rand() * 350;
    const soft = 100 + rand() * 100;
    const below = soft + 80 + rand() * 250;
    for (const [vs, d] of [
      [crust, 1 + rand() * 4],
      [soft, 3 + rand() * 8],
      [below, 4 + rand() * 10],
    ]) {
      layers.push({ thickness: d, vs, vp: vpOf(vs), density: 1700 + rand() * 500 });
    }
  } else {
    const n = 1 + Math.floor(rand() * 4);
    for (let i = 0; i < n; i++) {
      const vs = 120 + rand() * 500;
      layers.push({ thickness: 1 + rand() * 10, vs, vp: vpOf(vs), density: 1700 + rand() * 500 });
    }
  }
  const fastest = Math.max(...layers.map((l) => l.vs));
  const vsH = Math.max(fastest, 300) * (1.05 + rand() * 0.5);
  return { layers, halfspace: { vs: vsH, vp: vpOf(vsH), density: 2100 } };
}

describe('Rayleigh roots against the thin-layer method on seeded random models', () => {
  it('finds every thin-layer mode below ~0.9·β_H and no other, in order (10 models, half with a low-velocity layer)', () => {
    const rand = mulberry32(13_2026);
    const out = new Float64Array(100);
    let modes = 0;
    for (let t = 0; t < 10; t++) {
      const model = randomModel(rand, t % 2 === 0);
      const slowest = Math.min(...model.layers.map((l) => l.vs));
      const total = model.layers.reduce((s, l) => s + l.thickness, 0);
      // Two to five shear wavelengths of the slowest layer across the stack.
      const f = ((2 + 3 * rand()) * slowest) / total;
      const solver = new RayleighStackSolver(prepareRayleighStack(model));
      const n = solver.solve(2 * Math.PI * f, out.length, out);
      expect(solver.outcome.status).toBe('converged');
      const roots = Array.from(out.subarray(0, n));
      const h = slowest / f / 16;
      const depth = total + 4 * (model.halfspace.vs / f);
      const tlm = thinLayerRayleighModes(model, f, { h, growth: 1.2, depth }).map((m) => m.phase);
      let cut = 0.9 * model.halfspace.vs;
      const near = (c: number) => Math.abs(c - cut) < 0.03 * cut;
      while ([...roots, ...tlm].some(near)) cut *= 0.97;
      const a = roots.filter((c) => c < cut);
      const b = tlm.filter((c) => c < cut);
      const ctx = `model ${t}, f ${f.toFixed(3)} Hz, cut ${cut.toFixed(1)}: solver ${a.map((c) => c.toFixed(2))}, thin-layer ${b.map((c) => c.toFixed(2))}, ${JSON.stringify(model)}`;
      expect(a.length, ctx).toBe(b.length);
      for (let m = 0; m < a.length; m++) {
        const rel = (b[m] - a[m]) / a[m];
        expect(rel > -2e-3 && rel < 0.05, `mode ${m}: ${ctx}`).toBe(true);
      }
      modes += a.length;
    }
    expect(modes).toBeGreaterThan(20);
  }, 60_000);
});
