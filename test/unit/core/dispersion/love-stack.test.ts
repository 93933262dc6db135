/**
 * Properties of the Thomson–Haskell SH propagator and its root solver
 * (core/dispersion/love-stack.ts). Sources: Aki & Richards, *Quantitative Seismology*,
 * 2nd ed. 2002, §7.2 (layer matrices, det P = 1, the c = β limit); the
 * Sturm–Liouville node count (mode n has n nodes); splitting a layer must
 * change nothing (closed form: a homogeneous layer is its own sublayers).
 * Models are invented for the tests.
 */
import { describe, expect, it } from 'vitest';
import {
  LoveStackSolver,
  loveModesBelow,
  loveNodeCount,
  loveSecular,
  loveStackCutoff,
  loveStackModeCount,
  prepareLoveStack,
  shLayerMatrix,
} from '../../../../core/dispersion/love-stack';
import type { LayeredModel } from '../../../../core/dispersion/model';
import { INVENTED_LVL_SITE } from '../../../fixtures';

/** Invented three-layer site with a low-velocity layer at depth. */
const lvl: LayeredModel = INVENTED_LVL_SITE;

function splitModel(model: LayeredModel, parts: number): LayeredModel {
  return {
    layers: model.layers.flatMap((l) => Array.from({ length: parts }, () => ({ ...l, thickness: l.thickness / parts }))),
    halfspace: model.halfspace,
  };
}

function roots(model: LayeredModel, f: number, modes = 50): Float64Array {
  const solver = new LoveStackSolver(prepareLoveStack(model));
  const out = new Float64Array(modes);
  const n = solver.solve(2 * Math.PI * f, modes, out);
  expect(solver.outcome.status).toBe('converged');
  return out.slice(0, n);
}

describe('SH layer matrix', () => {
  it('has det P = 1 (scaled: det = e^(−2·returned scale)), oscillatory and evanescent', () => {
    const out = new Float64Array(4);
    const cases = [
      // [thickness, vs, density, f, c]
      [10, 200, 1800, 5, 300],
      [10, 200, 1800, 50, 201],
      [10, 400, 1800, 5, 300],
      [10, 900, 2000, 5, 150], // γd ≈ 2.1
      [3, 200, 1800, 1, 200 * (1 + 1e-12)],
      [3, 200, 1800, 1, 200 * (1 - 1e-12)],
    ];
    for (const [h, vs, rho, f, c] of cases) {
      const s = shLayerMatrix(out, h, vs, rho, 2 * Math.PI * f, c);
      const det = out[0] * out[3] - out[1] * out[2];
      const want = Math.exp(-2 * s);
      expect(Math.abs(det / want - 1), `h ${h}, vs ${vs}, f ${f}, c ${c}: det ${det}, want ${want}`).toBeLessThan(1e-12);
    }
  });

  it('tends to [[1, d/μ], [0, 1]] at c = β from both sides, and equals it at c = β', () => {
    const out = new Float64Array(4);
    const mu = 1800 * 200 * 200;
    for (const c of [200, 200 * (1 + 1e-10), 200 * (1 - 1e-10)]) {
      const s = shLayerMatrix(out, 7, 200, 1800, 2 * Math.PI * 10, c);
      expect(s).toBeLessThan(1e-4);
      const e = Math.exp(s); // undo the scaling
      expect(Math.abs(out[0] * e - 1)).toBeLessThan(1e-8);
      expect(Math.abs(out[3] * e - 1)).toBeLessThan(1e-8);
      expect(Math.abs((out[1] * e) / (7 / mu) - 1)).toBeLessThan(1e-8);
      expect(Math.abs(out[2] * e) * (7 / mu)).toBeLessThan(1e-8);
    }
  });
});

describe('secular function and Sturm count', () => {
  const stack = prepareLoveStack(lvl);
  const omega = 2 * Math.PI * 12;

  it('counts modes below c monotonically from 0 at β_min to the number present at β_H', () => {
    let previous = loveModesBelow(stack, omega, stack.vsMin);
    expect(previous).toBe(0);
    for (let i = 1; i <= 2000; i++) {
      const c = stack.vsMin + ((stack.vsH - stack.vsMin) * i) / 2000;
      const n = loveModesBelow(stack, omega, c);
      expect(n).toBeGreaterThanOrEqual(previous);
      previous = n;
    }
    expect(previous).toBe(loveStackModeCount(stack, omega));
  });

  it('just below the root of mode n the surface solution has exactly n nodes (Sturm–Liouville)', () => {
    for (const f of [3, 12, 40, 90]) {
      const r = roots(lvl, f);
      expect(r.length).toBeGreaterThan(0);
      r.forEach((c, n) => {
        // 1e-7 below the root: clear of rounding, far closer than the next root.
        if (n > 0) expect(c * (1 - 1e-7)).toBeGreaterThan(r[n - 1]);
        expect(loveNodeCount(stack, 2 * Math.PI * f, c * (1 - 1e-7)), `mode ${n} at ${f} Hz`).toBe(n);
      });
    }
  });

  it('keeps det = e^(−2·scale) for a deep evanescent layer where the scaled entries stay finite', () => {
    const out = new Float64Array(4);
    const s = shLayerMatrix(out, 100, 900, 2000, 2 * Math.PI * 40, 150); // γd ≈ 165
    expect(s).toBeGreaterThan(160);
    // Unscaled, cosh(165) ≈ 1e71; scaled, every entry is finite and the diagonal is ½ + ½e^(−2γd).
    for (const v of out) expect(Number.isFinite(v)).toBe(true);
    expect(out[0]).toBe(0.5);
    expect(out[3]).toBe(0.5);
  });

  it('stays finite at high frequency through very thick fast layers (scaled propagator)', () => {
    const thick: LayeredModel = {
      layers: [
        { thickness: 2000, vs: 900, density: 2000 },
        { thickness: 50, vs: 200, density: 1800 },
      ],
      halfspace: { vs: 1000, density: 2100 },
    };
    const s = prepareLoveStack(thick);
    // Unscaled, cosh(γd) with γd ≈ 2πf·d/c ≈ 1800 would overflow.
    expect(Number.isFinite(loveSecular(s, 2 * Math.PI * 30, 300))).toBe(true);
    const a = roots(thick, 30, 5);
    const b = roots(splitModel(thick, 4), 30, 5);
    expect(a.length).toBe(5);
    a.forEach((c, i) => {
      expect(Number.isFinite(c)).toBe(true);
      expect(Math.abs(b[i] / c - 1), `mode ${i}`).toBeLessThan(1e-9);
      expect(loveNodeCount(s, 2 * Math.PI * 30, c * (1 - 1e-7))).toBe(i);
    });
  });
});

describe('root solver', () => {
  it('returns modes in ascending phase velocity, within (β_min, β_H)', () => {
    for (const f of [1, 5, 12, 30, 80]) {
      const r = roots(lvl, f);
      for (let i = 0; i < r.length; i++) {
        expect(r[i]).toBeGreaterThan(150);
        expect(r[i]).toBeLessThan(600);
        if (i > 0) expect(r[i]).toBeGreaterThan(r[i - 1]);
      }
    }
  });

  it('finds the same roots when every layer is split into sublayers', () => {
    for (const f of [2, 12, 45]) {
      const a = roots(lvl, f);
      for (const parts of [2, 5]) {
        const b = roots(splitModel(lvl, parts), f);
        expect(b.length).toBe(a.length);
        a.forEach((c, i) => expect(Math.abs(b[i] / c - 1), `mode ${i}, ${parts} parts, ${f} Hz`).toBeLessThan(1e-9));
      }
    }
  });

  it('is hardly moved by a 1 mm layer on top, and keeps the mode count', () => {
    const withFilm: LayeredModel = { layers: [{ thickness: 0.001, vs: 80, density: 1500 }, ...lvl.layers], halfspace: lvl.halfspace };
    const a = roots(lvl, 12);
    const b = roots(withFilm, 12);
    expect(b.length).toBe(a.length);
    a.forEach((c, i) => expect(Math.abs(b[i] / c - 1)).toBeLessThan(1e-3));
  });

  it('asks only for the modes wanted and reports what is present', () => {
    const solver = new LoveStackSolver(prepareLoveStack(lvl));
    const out = new Float64Array(2);
    const omega = 2 * Math.PI * 30;
    expect(solver.solve(omega, 2, out)).toBe(2);
    expect(solver.outcome.present).toBe(loveStackModeCount(solver.stack, omega));
    expect(solver.outcome.present).toBeGreaterThan(2);
    expect(solver.outcome.found).toBe(2);
    expect(solver.outcome.evaluations).toBeGreaterThan(0);
    expect(solver.outcome.worstResidual).toBeLessThan(1e-10);
    expect(solver.solve(-1, 2, out)).toBe(0);
    expect(solver.solve(omega, 0, out)).toBe(0);
  });

  it('finds overtone cutoffs where the mode count steps up', () => {
    const s = prepareLoveStack(lvl);
    let previous = 0;
    for (let n = 1; n <= 4; n++) {
      const r = loveStackCutoff(s, n);
      expect(r.status).toBe('converged');
      expect(r.frequency).toBeGreaterThan(previous);
      expect(loveStackModeCount(s, 2 * Math.PI * r.frequency * (1 - 1e-9))).toBe(n);
      expect(loveStackModeCount(s, 2 * Math.PI * r.frequency * (1 + 1e-9))).toBe(n + 1);
      previous = r.frequency;
    }
    expect(loveStackCutoff(s, 0)).toEqual({ status: 'converged', frequency: 0, evaluations: 0 });
  });
});
