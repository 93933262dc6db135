/**
 * No Rayleigh mode lost, none found twice: seeded random models and
 * frequencies against a dense scan.
 *
 * Reference: the plain 6-minor compound-matrix form of the secular function
 * (rayleighSecularReference: the 4×4 matrices of the derivation multiplied
 * out, not the solver's fast 5-minor step), sampled at 3,000 phase
 * velocities evenly spaced from 0.3·β_min (well below the solver's floor,
 * 0.9 × the slowest Rayleigh speed, so a root below the floor would show)
 * to β_H. Each sign change is a mode: every one must hold a solver root,
 * and every solver root must be a sign change of the reference (so the
 * solver may find more than the scan, two roots in one scan interval, but
 * never a false one).
 *
 * Models: 1–5 layers, thickness 0.5–30 m, β 60–900 m/s in any order
 * (low-velocity layers and stiff crusts included), vp/vs from 1.45 to 4 or
 * at least 1,500 m/s (saturated ground, common practice), ρ 1500–2500
 * kg/m³, half-space faster than the slowest layer; frequency 0.5–60 Hz
 * log-uniform. Seeded (mulberry32), so every run checks the same cases.
 * Group velocity: in every 5th case, against a Richardson-extrapolated
 * central difference dω/dk of the solver's own phase velocity (of the
 * fundamental when the chosen overtone is within 0.1 % of its cutoff).
 */
import { describe, expect, it } from 'vitest';
import type { LayeredModel } from '../../../../core/dispersion/model';
import { rayleighSecularReference } from '../../../../core/dispersion/rayleigh-secular';
import { RayleighStackSolver, prepareRayleighStack, rayleighStackGroupVelocity } from '../../../../core/dispersion/rayleigh-stack';
import { mulberry32 } from '../../../../core/shared/random';

function randomModel(rand: () => number): LayeredModel {
  const n = 1 + Math.floor(rand() * 5);
  const layers = [];
  const vpOf = (vs: number) => (rand() < 0.3 ? Math.max(1500, 1.5 * vs) : vs * (1.45 + rand() * 2.55));
  for (let i = 0; i < n; i++) {
    const vs = 60 + rand() * 840;
    layers.push({ thickness: 0.5 + rand() * 29.5, vs, vp: vpOf(vs), density: 1500 + rand() * 1000 });
  }
  const slowest = Math.min(...layers.map((l) => l.vs));
  const vsH = slowest + 20 + rand() * (1200 - slowest);
  return { layers, halfspace: { vs: vsH, vp: vpOf(vsH), density: 1800 + rand() * 700 } };
}

describe('the Rayleigh solver never misses or duplicates a mode', () => {
  it('matches a dense scan of the reference secular function on 120 seeded random models and frequencies', () => {
    const rand = mulberry32(20261202);
    const out = new Float64Array(200);
    let modesChecked = 0;
    let refined = 0;
    let gvChecked = 0;
    const gvBad: string[] = [];
    for (let trial = 0; trial < 120; trial++) {
      const model = randomModel(rand);
      const f = 0.5 * Math.pow(120, rand());
      const omega = 2 * Math.PI * f;
      const stack = prepareRayleighStack(model);
      const solver = new RayleighStackSolver(stack);
      const found = solver.solve(omega, out.length, out);
      const ctx = () => `trial ${trial}, f = ${f} Hz, model ${JSON.stringify(model)}, roots ${Array.from(out.subarray(0, found))}`;
      expect(solver.outcome.status, ctx()).toBe('converged');
      expect(solver.outcome.complete, ctx()).toBe(true);
      const Fr = (c: number) => rayleighSecularReference(stack, omega, c);
      const lo = 0.3 * Math.min(...model.layers.map((l) => l.vs));
      const hi = stack.vsH;
      const points = 3000;
      const brackets: number[][] = [];
      let c0 = lo;
      let f0 = Fr(c0);
      for (let i = 1; i <= points; i++) {
        const c1 = lo + ((hi - lo) * i) / points;
        const f1 = Fr(c1);
        if (f1 === 0 || f0 * f1 < 0) brackets.push([c0, c1]);
        c0 = c1;
        f0 = f1;
      }
      // Every solver root is a sign change of the reference.
      for (let i = 0; i < found; i++) {
        // ±1e-7 relative: F is noisy at about 1e-8 relative around roots in models with a layer ten times
        // stiffer than c (terms in (β/c)⁴ cancel), though the root itself is a clean sign change beyond that.
        const a = Fr(out[i] * (1 - 1e-7));
        const b = Fr(out[i] * (1 + 1e-7));
        expect(a * b <= 0, `root ${i} at ${out[i]} is no sign change of the reference: ${ctx()}`).toBe(true);
        if (i > 0) expect(out[i], ctx()).toBeGreaterThan(out[i - 1]);
      }
      // Every reference sign change holds a solver root.
      for (const [a, b] of brackets) {
        let hit = false;
        for (let i = 0; i < found; i++) if (out[i] >= a && out[i] <= b) hit = true;
        expect(hit, `reference root in [${a}, ${b}] missed: ${ctx()}`).toBe(true);
      }
      // Extra solver roots (two in one scan interval) are real: each is a sign change of the reference
      // (checked above) and they are distinct (farther apart than that check's width).
      if (found !== brackets.length) refined++;
      for (let i = 1; i < found; i++) expect(out[i] - out[i - 1], ctx()).toBeGreaterThan(2e-7 * out[i]);
      expect(found, `mode count: ${ctx()}`).toBeGreaterThanOrEqual(brackets.length);
      modesChecked += found;
      if (trial % 5 === 0 && found > 0) {
        let n = trial % 3 === 0 ? found - 1 : 0;
        // Next to a cutoff (c within 0.1 % of β_H) the mode is missing on one side of the difference, and next to
        // another root (within 1 %) the numbering may pass to the other branch across the difference: take the fundamental.
        const crowded = (i: number) => (i > 0 && out[i] - out[i - 1] < 0.01 * out[i]) || (i + 1 < found && out[i + 1] - out[i] < 0.01 * out[i]);
        if (out[n] > 0.999 * stack.vsH || crowded(n)) n = 0;
        if (crowded(n)) continue;
        const c = out[n];
        const kAt = (w: number) => {
          const r = new Float64Array(n + 1);
          solver.solve(w, n + 1, r);
          return w / r[n];
        };
        const central = (d: number) => (2 * d * omega) / (kAt(omega * (1 + d)) - kAt(omega * (1 - d)));
        const num = (4 * central(5e-5) - central(1e-4)) / 3;
        const u = rayleighStackGroupVelocity(stack, omega, c);
        gvChecked++;
        // Tolerance: the Richardson-extrapolated difference is good to about 1e-8 here; 1e-6 leaves room near close roots.
        if (!(Math.abs(u / num - 1) <= 1e-6)) gvBad.push(`U ${u} vs dω/dk ${num}, mode ${n}: ${ctx()}`);
      }
    }
    expect(modesChecked).toBeGreaterThan(300);
    expect(gvChecked).toBeGreaterThan(20);
    expect(gvBad.slice(0, 3)).toEqual([]);
    expect(refined).toBeLessThan(12);
  }, 180_000);
});
