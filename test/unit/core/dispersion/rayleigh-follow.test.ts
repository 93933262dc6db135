/**
 * Rayleigh curves (followModes, core/dispersion/curve.ts): each frequency is
 * solved by the root scan's fast mode and checked against its neighbours;
 * the roots must equal those of the careful mode (the solver's default) at
 * every frequency. Reference: the careful scan of the same compound-matrix
 * secular function (its own checks are in rayleigh-random.test.ts and
 * test/reference/rayleigh-thin-layer.test.ts). Models are invented; the
 * first is a seeded random model (a very soft layer under stiffer ones;
 * found by a seeded search, mulberry32 seed 4242) on which the fast scan
 * alone misses a close pair at 30.720 Hz.
 */
import { describe, expect, it } from 'vitest';
import { followModes } from '../../../../core/dispersion/curve';
import type { LayeredModel } from '../../../../core/dispersion/model';
import { RayleighStackSolver, prepareRayleighStack } from '../../../../core/dispersion/rayleigh-stack';
import { mulberry32 } from '../../../../core/shared/random';
import { randomLayers } from '../../../fixtures';

const pairNearThirdRoot: LayeredModel = {
  layers: [
    { thickness: 20.41473337786738, vs: 620.9431130904704, vp: 2406.6941045662934, density: 1983.961576828733 },
    { thickness: 16.153791005141102, vs: 744.0594870317727, vp: 1500, density: 2306.1180112417787 },
    { thickness: 10.578708685352467, vs: 80.19098829478025, vp: 1500, density: 1812.9490872379392 },
    { thickness: 28.50105591979809, vs: 204.3332969583571, vp: 346.5116620459104, density: 1620.758882490918 },
  ],
  halfspace: { vs: 927.0647845950532, vp: 1500, density: 1919.4982212036848 },
};
const MISSED_AT = 30.719557840377092;

/** Frequencies where followModes and careful solves disagree. */
function disagreements(model: LayeredModel, freq: Float64Array, modes: number): string[] {
  const solver = new RayleighStackSolver(prepareRayleighStack(model));
  const followed = followModes(solver, freq, modes);
  expect(solver.careful).toBe(true);
  const out = new Float64Array(modes);
  const bad: string[] = [];
  for (let i = 0; i < freq.length; i++) {
    const n = solver.solve(2 * Math.PI * freq[i], modes, out);
    const got = Array.from(followed.phase.subarray(i * modes, i * modes + followed.found[i]));
    const want = Array.from(out.subarray(0, n));
    if (got.length !== want.length || got.some((c, m) => Math.abs(c - want[m]) > 1e-10 * want[m])) {
      bad.push(`${freq[i]} Hz: curve ${got.map((c) => c.toFixed(3))}, careful ${want.map((c) => c.toFixed(3))}`);
    }
  }
  return bad;
}

describe('Rayleigh curves: fast scan checked against neighbouring frequencies', () => {
  it('recovers a close pair beside a third root that the fast scan alone misses', () => {
    const solver = new RayleighStackSolver(prepareRayleighStack(pairNearThirdRoot));
    const careful = new Float64Array(30);
    const fast = new Float64Array(30);
    const nc = solver.solve(2 * Math.PI * MISSED_AT, 30, careful);
    solver.careful = false;
    const nfast = solver.solve(2 * Math.PI * MISSED_AT, 30, fast);
    // The case is a real test of the check: the fast scan alone loses two roots here.
    expect(nc - nfast).toBe(2);
    const freq = Float64Array.from({ length: 41 }, (_, i) => MISSED_AT * (0.8 + 0.01 * i));
    const band = Float64Array.from([...freq, MISSED_AT]).sort();
    expect(disagreements(pairNearThirdRoot, band, 20)).toEqual([]);
  });

  it('equals the careful scan at every frequency on seeded random models (8 modes, 40 frequencies each)', () => {
    const rand = mulberry32(4242);
    const bad: string[] = [];
    for (let t = 0; t < 8; t++) {
      const layers = randomLayers(rand);
      const slowest = Math.min(...layers.map((l) => l.vs));
      const vsH = slowest + 20 + rand() * (1200 - slowest);
      const model: LayeredModel = { layers, halfspace: { vs: vsH, vp: vsH * (1.6 + rand()), density: 2000 } };
      const f0 = 0.5 + 3 * rand();
      const f1 = f0 * (5 + 40 * rand());
      const freq = Float64Array.from({ length: 40 }, (_, i) => f0 * Math.pow(f1 / f0, i / 39));
      bad.push(...disagreements(model, freq, 8).map((b) => `model ${t}: ${b}`));
    }
    expect(bad).toEqual([]);
  });
});
