/**
 * Dispersion-engine benchmarks (issue 2 §5). Targets on the 2-core machine,
 * medians: one curve of 200 frequencies × 5 modes in ≤ 1 ms for one layer
 * and ≤ 10 ms for a 5-layer model; a single root in ≤ 5 µs.
 * Models are invented for the benchmark (a soft-soil site).
 */
import { logBand, loveCurves } from '../../core/dispersion/curve';
import { lovePhaseVelocitySolve, type TwoLayer } from '../../core/dispersion/love-layer';
import { LoveStackSolver, prepareLoveStack } from '../../core/dispersion/love-stack';
import type { LayeredModel } from '../../core/dispersion/model';
import { INVENTED_FIVE_LAYER_SITE } from '../fixtures';
import { bench, type BenchResult } from './harness';

/** Invented one-layer site: 12 m of soft soil over stiffer ground. */
const oneLayer: LayeredModel = {
  layers: [{ thickness: 12, vs: 180, density: 1800 }],
  halfspace: { vs: 650, density: 2100 },
};

/** Invented five-layer site, with a low-velocity layer at depth. */
const fiveLayer: LayeredModel = INVENTED_FIVE_LAYER_SITE;

export default async function dispersionBench(): Promise<BenchResult[]> {
  const band = logBand(2, 60, 200);
  const results: BenchResult[] = [];
  results.push(
    await bench('love curve, 1 layer, 200 f × 5 modes', () => loveCurves(oneLayer, band, { modes: 5 }), {
      target_ms: 1,
      samples: 101,
      note: 'closed forms (love-layer.ts), Newton in φ warm-started from the previous frequency',
    }),
  );
  results.push(
    await bench('love curve, 5 layers, 200 f × 5 modes', () => loveCurves(fiveLayer, band, { modes: 5 }), {
      target_ms: 10,
      samples: 51,
      note: 'Thomson–Haskell + Sturm count + Brent, energy-integral U',
    }),
  );
  const p: TwoLayer = { h: 12, vs1: 180, vs2: 650, rho1: 1800, rho2: 2100 };
  let f = 10;
  results.push(
    await bench(
      'single root, 1 layer (mode 0)',
      () => {
        f = f === 10 ? 10.5 : 10;
        return lovePhaseVelocitySolve(p, f, 0);
      },
      { inner: 2000, samples: 51, target_ms: 0.005, note: 'Brent on the phase residual' },
    ),
  );
  const stack = prepareLoveStack(fiveLayer);
  const solver = new LoveStackSolver(stack);
  const out = new Float64Array(1);
  results.push(
    await bench(
      'single root, 5 layers (mode 0)',
      () => {
        f = f === 10 ? 10.5 : 10;
        return solver.solve(2 * Math.PI * f, 1, out);
      },
      { inner: 500, samples: 51, target_ms: 0.005, note: 'count isolation + Brent' },
    ),
  );
  return results;
}
