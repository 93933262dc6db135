/**
 * Seeded coverage trials of the layered estimate, shared by the coverage
 * test (test/reference/profile-coverage.test.ts, modest sizes for npm test)
 * and the bench (test/bench/profile.bench.ts, 200 trials per case).
 *
 * Each trial: exact picks of an invented model from the forward step of
 * core/profile (fundamental mode, every third a phase pick, sd 3 % of the
 * velocity), plus Gaussian noise of that sd (core/shared/random.ts:
 * Mulberry32 and Box–Muller, Box & Muller 1958), then estimateProfile with
 * the true number of layers and the true P-speed rule; count how often each
 * true parameter lies inside its 68 % and 95 % interval.
 */
import type { LayeredModel } from '../../core/dispersion/model';
import type { Pick } from '../../core/picks/picks';
import { estimateProfile, type ProfileEffort, type ParameterInterval } from '../../core/profile/profile-estimate';
import { vpFromPoisson } from '../../core/profile/p-speed';
import { mulberry32 } from '../../core/shared/random';
import { layeredPicks } from '../fixtures';

export interface CoverageCase {
  name: string;
  model: LayeredModel;
  /** Picks per wave, and the band (Hz) of each. */
  waves: ReadonlyArray<{ wave: 'love' | 'rayleigh'; count: number; from: number; to: number }>;
  /** Poisson's ratio of the model (its P speeds), given to the estimate too. */
  poisson: number;
  trials: number;
  seed: number;
  effort?: Partial<ProfileEffort>;
}

export interface CoverageReport {
  name: string;
  trials: number;
  /** Per parameter (h1, vs1, …, vsH): the share of trials whose 68 % and 95 % intervals hold the truth. */
  rates: Array<{ parameter: string; rate68: number; rate95: number }>;
  /** Pooled over every parameter. */
  pooled68: number;
  pooled95: number;
}

export function runCoverage(c: CoverageCase): CoverageReport {
  const N = c.model.layers.length;
  const vp = [...c.model.layers.map((l) => vpFromPoisson(l.vs, c.poisson)), vpFromPoisson(c.model.halfspace.vs, c.poisson)];
  const truth = [...c.model.layers.map((l) => l.thickness), ...c.model.layers.map((l) => l.vs), c.model.halfspace.vs];
  const names = [...c.model.layers.map((_, j) => `h${j + 1}`), ...c.model.layers.map((_, j) => `vs${j + 1}`), 'vsH'];
  const hits68 = new Array(truth.length).fill(0);
  const hits95 = new Array(truth.length).fill(0);
  const rand = mulberry32(c.seed);
  for (let t = 0; t < c.trials; t++) {
    const picks: Pick[] = c.waves.flatMap((w) => layeredPicks(c.model, w.wave, w.count, w.from, w.to, rand, vp));
    const r = estimateProfile(picks, { layers: N, compareLayers: false, poisson: c.waves.some((w) => w.wave === 'rayleigh') ? c.poisson : undefined, seed: 1000 + t, effort: c.effort });
    const got: ParameterInterval[] = [...r.profile.layers.map((l) => l.thickness), ...r.profile.layers.map((l) => l.vs), r.profile.halfspace.vs];
    got.forEach((p, i) => {
      if (p.low68 <= truth[i] && truth[i] <= p.high68) hits68[i]++;
      if (p.low95 <= truth[i] && truth[i] <= p.high95) hits95[i]++;
    });
  }
  const rates = names.map((parameter, i) => ({ parameter, rate68: hits68[i] / c.trials, rate95: hits95[i] / c.trials }));
  const sum = (a: number[]) => a.reduce((s, x) => s + x, 0);
  return { name: c.name, trials: c.trials, rates, pooled68: sum(hits68) / (c.trials * truth.length), pooled95: sum(hits95) / (c.trials * truth.length) };
}
