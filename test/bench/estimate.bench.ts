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
import { estimateLayer } from '../../core/estimate';
import { loveVelocities } from '../../core/love-layer';
import type { Pick } from '../../core/picks';
import { gaussian, mulberry32 } from '../../core/random';
import { bench, type BenchResult } from './harness';

function noisyPicks(count: number, seed: number): Pick[] {
  const rand = mulberry32(seed);
  const m = { h: 12, vs1: 200, vs2: 500, rho1: 1800, rho2: 2100 };
  return Array.from({ length: count }, (_, i) => {
    const f = 3 * Math.pow(40 / 3, i / (count - 1));
    const v = loveVelocities(m, f, 0);
    const phase = i % 3 === 0;
    const exact = phase ? v.phase : v.group;
    const z = gaussian(rand);
    return { frequency: f, velocity: exact * (1 + 0.03 * z), kind: phase ? 'phase' : 'group', mode: 0, sd: 0.03 * exact };
  });
}

export default async function (): Promise<BenchResult[]> {
  const picks = noisyPicks(30, 42);
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
