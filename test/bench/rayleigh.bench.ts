/**
 * Rayleigh-wave benchmarks (issue 13). Targets on the 2-core machine,
 * medians: one curve of 200 frequencies × 5 modes in ≤ 20 ms for a 5-layer
 * model; a single root (the fundamental) in ≤ 20 µs, measured three ways
 * (nothing known with the careful and the fast scan; tracked from a
 * neighbouring frequency's root, as inside a curve). The model is the
 * invented five-layer site of test/fixtures.ts with invented P speeds
 * (vp = 2.2·vs in the layers, 1400 m/s in the half-space).
 */
import { logBand, rayleighCurves } from '../../core/dispersion/curve';
import type { LayeredModel } from '../../core/dispersion/model';
import { RayleighStackSolver, prepareRayleighStack, rayleighSecular, rayleighStackGroupVelocity } from '../../core/dispersion/rayleigh-stack';
import { INVENTED_FIVE_LAYER_SITE } from '../fixtures';
import { bench, type BenchResult } from './harness';

const fiveLayer: LayeredModel = {
  layers: INVENTED_FIVE_LAYER_SITE.layers.map((l) => ({ ...l, vp: 2.2 * l.vs })),
  halfspace: { ...INVENTED_FIVE_LAYER_SITE.halfspace, vp: 1400 },
};

export default async function rayleighBench(): Promise<BenchResult[]> {
  const band = logBand(2, 60, 200);
  const results: BenchResult[] = [];
  results.push(
    await bench('rayleigh curve, 5 layers, 200 f × 5 modes', () => rayleighCurves(fiveLayer, band, { modes: 5 }), {
      target_ms: 20,
      samples: 21,
      note: 'compound matrices, fast phase-resolved scan + slope-checked dip probes + Brent, each frequency checked against its neighbours (followModes), U by implicit differentiation',
    }),
  );
  const stack = prepareRayleighStack(fiveLayer);
  const solver = new RayleighStackSolver(stack);
  const out = new Float64Array(1);
  let f = 10;
  const fundamental = (careful: boolean) => () => {
    f = f === 10 ? 10.5 : 10;
    solver.careful = careful;
    return solver.solve(2 * Math.PI * f, 1, out);
  };
  results.push(
    await bench('rayleigh single root, 5 layers (mode 0 at one frequency, nothing known, careful scan)', fundamental(true), {
      inner: 200,
      samples: 31,
      target_ms: 0.02,
      note: 'RayleighStackSolver.solve(ω, 1) in its default careful mode: scan from the floor to the first root, then Brent',
    }),
  );
  results.push(
    await bench('rayleigh single root, 5 layers (mode 0 at one frequency, nothing known, fast scan)', fundamental(false), {
      inner: 200,
      samples: 31,
      target_ms: 0.02,
      note: 'the same with careful = false (the mode curves use, checked there against neighbouring frequencies)',
    }),
  );
  // Tracked: mode 0 at 10.5 Hz given the root at 10 Hz, carried along its branch (dc/dω = (c/ω)(1 − c/U)) and the
  // scan started just below it, as followModes does from one frequency of a curve to the next.
  const w10 = 2 * Math.PI * 10;
  const w105 = 2 * Math.PI * 10.5;
  solver.careful = true;
  solver.solve(w10, 1, out);
  const c10 = out[0];
  const u10 = rayleighStackGroupVelocity(stack, w10, c10);
  const step = (c10 / w10) * (1 - c10 / u10) * (w105 - w10);
  const start = c10 + step - 4 * Math.max(Math.abs(step), 1e-3 * c10);
  solver.careful = false;
  results.push(
    await bench(
      'rayleigh single root, 5 layers (mode 0 at 10.5 Hz tracked from the 10 Hz root, as in a curve)',
      () => solver.solve(w105, 1, out, start),
      {
        inner: 200,
        samples: 31,
        target_ms: 0.02,
        note: 'fast scan started just below the carried root (solve with start), then Brent',
      },
    ),
  );
  solver.careful = true;
  let c = 200;
  results.push(
    await bench(
      'rayleigh secular function, 5 layers (one evaluation)',
      () => {
        c = c === 200 ? 201 : 200;
        return rayleighSecular(stack, 2 * Math.PI * 10, c);
      },
      { inner: 5000, samples: 31, note: 'five-minor compound-matrix step per layer' },
    ),
  );
  return results;
}
