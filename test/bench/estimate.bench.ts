/**
 * Estimate benchmarks (issue 3 §6). Targets on the 2-core machine, medians:
 * thickness only, 30 picks, ≤ 5 ms; joint thickness + β1 + β2 with
 * intervals and misfit map, ≤ 150 ms. Every run is a complete estimateLayer
 * call (search, refinement, profile intervals, diagnostics, site figures).
 *
 * Picks: an invented soft-soil site (H = 12 m, β1 = 200 m/s, β2 = 500 m/s)
 * from the closed-form forward model, 3–40 Hz, every third a phase pick,
 * with seeded 3 % Gaussian noise (mulberry32 + Box–Muller) so the fits
 * work as on real data.
 */
import { estimateLayer } from '../../core/estimate/estimate';
import { mulberry32 } from '../../core/shared/random';
import { softSitePicks } from '../fixtures';
import { bench, type BenchResult } from './harness';

export default async function (): Promise<BenchResult[]> {
  const picks = softSitePicks(30, mulberry32(42));
  return [
    await bench('estimate: thickness only, 30 picks', () => estimateLayer(picks, { vs1: 200, vs2: 500 }), {
      samples: 51,
      target_ms: 5,
      note: 'full estimateLayer: search, LM, 68/95 % profile intervals, diagnostics',
    }),
    await bench('estimate: joint H + vs1 + vs2, 30 picks', () => estimateLayer(picks), {
      samples: 21,
      warmup: 3,
      target_ms: 150,
      note: 'grid 64×32×24, LM, profile intervals for 3 parameters, misfit map',
    }),
  ];
}
