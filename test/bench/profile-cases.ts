/**
 * The timed cases of the layered-estimate bench (profile.bench.ts), shared
 * with the worker thread that times them (profile-worker.ts).
 *
 * Picks: the invented three-layer site (test/fixtures.ts), 3–40 Hz, every
 * third a phase pick, seeded 3 % Gaussian noise; Rayleigh picks with P
 * speeds from Poisson's ratio 0.3, and the estimate told the same.
 */
import { vpFromPoisson } from '../../core/profile/p-speed';
import type { ProfileOptions } from '../../core/profile/profile-estimate';
import { forwardWork } from '../../core/profile/profile-forward';
import type { LayeredModel } from '../../core/dispersion/model';
import type { Pick } from '../../core/picks/picks';
import { mulberry32 } from '../../core/shared/random';
import { INVENTED_THREE_LAYER_SITE, INVENTED_TWO_LAYER_SITE, layeredPicks } from '../fixtures';

const POISSON = 0.3;

function vpOf(model: LayeredModel): number[] {
  return [...model.layers.map((l) => vpFromPoisson(l.vs, POISSON)), vpFromPoisson(model.halfspace.vs, POISSON)];
}

export interface ProfileCase {
  name: string;
  picks: () => Pick[];
  options: ProfileOptions;
  samples: number;
  target_ms?: number;
}

export const PROFILE_CASES: readonly ProfileCase[] = [
  {
    name: 'layered estimate: 3 layers, 40 Love picks, ensemble bands',
    picks: () => layeredPicks(INVENTED_THREE_LAYER_SITE, 'love', 40, 3, 40, mulberry32(42)),
    options: { layers: 3, seed: 1 },
    samples: 5,
    target_ms: 2000,
  },
  {
    name: 'layered estimate: 3 layers, 40 Rayleigh picks, ensemble bands',
    picks: () => layeredPicks(INVENTED_THREE_LAYER_SITE, 'rayleigh', 40, 3, 40, mulberry32(42), vpOf(INVENTED_THREE_LAYER_SITE)),
    options: { layers: 3, seed: 1, poisson: POISSON },
    samples: 5,
    target_ms: 2000,
  },
  {
    name: 'layered estimate: 2 layers, 12 Rayleigh picks, ensemble bands',
    picks: () => layeredPicks(INVENTED_TWO_LAYER_SITE, 'rayleigh', 12, 3, 50, mulberry32(42), vpOf(INVENTED_TWO_LAYER_SITE)),
    options: { layers: 2, seed: 1, poisson: POISSON },
    samples: 5,
  },
];

/** The forward work per call since `before` (a copy of forwardWork), over `calls` calls. */
export function workPerCall(before: typeof forwardWork, calls: number): Record<string, number> {
  const work: Record<string, number> = {};
  for (const key of Object.keys(forwardWork) as Array<keyof typeof forwardWork>) work[key] = Math.round((forwardWork[key] - before[key]) / calls);
  return work;
}
