/**
 * Seeded coverage trials of the layered estimate, shared by the coverage
 * tests (test/reference/profile-coverage*.test.ts: 200 trials of each case
 * of issue 13, the Love case lighter) and the bench
 * (test/bench/profile.bench.ts, 200 trials per case).
 *
 * Each trial: exact picks of an invented model from the forward step of
 * core/profile (fundamental mode, every third a phase pick, sd 3 % of the
 * velocity), plus Gaussian noise of that sd (core/shared/random.ts:
 * Mulberry32 and Box–Muller, Box & Muller 1958), then estimateProfile with
 * the true number of layers and the true P-speed rule; count how often each
 * true parameter lies inside its 68 % and 95 % interval. Also counted: the
 * trials whose fit was poor (the intervals then widened by χ²/dof) and
 * those where the true model fits the picks better than the best fit found
 * (the search missed the deepest basin).
 */
import type { LayeredModel } from '../../core/dispersion/model';
import type { Pick } from '../../core/picks/picks';
import { vpFromPoisson, withPSpeeds } from '../../core/profile/p-speed';
import { estimateProfile, type ParameterInterval, type ProfileEffort } from '../../core/profile/profile-estimate';
import { predictPicks, trackingOrder, type ForwardPicks } from '../../core/profile/profile-forward';
import { mulberry32 } from '../../core/shared/random';
import { INVENTED_TWO_LAYER_SITE, layeredPicks } from '../fixtures';

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
  /** Trials whose fit was worse than the pick errors allow (χ² above its 95 % point). */
  poorFits: number;
  /** Trials where the true model's χ² is below the best fit's (the search missed the deepest basin). */
  searchMisses: number;
}

/** The cases of issue 13 (and the Love case beside them), 200 trials each in the bench. */
export const COVERAGE_CASES: readonly CoverageCase[] = [
  {
    name: 'Rayleigh, 2 layers, 12 picks',
    model: INVENTED_TWO_LAYER_SITE,
    waves: [{ wave: 'rayleigh', count: 12, from: 3, to: 50 }],
    poisson: 0.3,
    trials: 200,
    seed: 2027,
  },
  {
    name: 'Love 8 + Rayleigh 8 picks, 2 layers',
    model: INVENTED_TWO_LAYER_SITE,
    waves: [
      { wave: 'love', count: 8, from: 3, to: 50 },
      { wave: 'rayleigh', count: 8, from: 3, to: 50 },
    ],
    poisson: 0.3,
    trials: 200,
    seed: 2028,
  },
  { name: 'Love, 2 layers, 20 picks', model: INVENTED_TWO_LAYER_SITE, waves: [{ wave: 'love', count: 20, from: 3, to: 50 }], poisson: 0.3, trials: 200, seed: 2026 },
];

export function runCoverage(c: CoverageCase): CoverageReport {
  const N = c.model.layers.length;
  const vp = [...c.model.layers.map((l) => vpFromPoisson(l.vs, c.poisson)), vpFromPoisson(c.model.halfspace.vs, c.poisson)];
  const truth = [...c.model.layers.map((l) => l.thickness), ...c.model.layers.map((l) => l.vs), c.model.halfspace.vs];
  const trueModel = withPSpeeds(
    c.model.layers.map((l) => l.thickness),
    [...c.model.layers.map((l) => l.vs), c.model.halfspace.vs],
    [...c.model.layers.map((l) => l.density), c.model.halfspace.density],
    { kind: 'poisson', poisson: c.poisson, defaulted: false },
  );
  const names = [...c.model.layers.map((_, j) => `h${j + 1}`), ...c.model.layers.map((_, j) => `vs${j + 1}`), 'vsH'];
  const hits68 = new Array(truth.length).fill(0);
  const hits95 = new Array(truth.length).fill(0);
  let poorFits = 0;
  let searchMisses = 0;
  const rand = mulberry32(c.seed);
  for (let t = 0; t < c.trials; t++) {
    const picks: Pick[] = c.waves.flatMap((w) => layeredPicks(c.model, w.wave, w.count, w.from, w.to, rand, vp));
    const r = estimateProfile(picks, { layers: N, compareLayers: false, poisson: c.waves.some((w) => w.wave === 'rayleigh') ? c.poisson : undefined, seed: 1000 + t, effort: c.effort });
    const got: ParameterInterval[] = [...r.profile.layers.map((l) => l.thickness), ...r.profile.layers.map((l) => l.vs), r.profile.halfspace.vs];
    got.forEach((p, i) => {
      if (p.low68 <= truth[i] && truth[i] <= p.high68) hits68[i]++;
      if (p.low95 <= truth[i] && truth[i] <= p.high95) hits95[i]++;
    });
    if (r.intervalScale > 1) poorFits++;
    if (chi2Of(picks, trueModel) < r.chi2 - 1e-6) searchMisses++;
  }
  const rates = names.map((parameter, i) => ({ parameter, rate68: hits68[i] / c.trials, rate95: hits95[i] / c.trials }));
  const sum = (a: number[]) => a.reduce((s, x) => s + x, 0);
  return {
    name: c.name,
    trials: c.trials,
    rates,
    pooled68: sum(hits68) / (c.trials * truth.length),
    pooled95: sum(hits95) / (c.trials * truth.length),
    poorFits,
    searchMisses,
  };
}

/** χ² of the picks against a model (each pick's own wave, kind and mode). */
function chi2Of(picks: readonly Pick[], model: ReturnType<typeof withPSpeeds>): number {
  const n = picks.length;
  const fp: ForwardPicks = {
    n,
    omega: Float64Array.from(picks, (p) => 2 * Math.PI * p.frequency),
    mode: Int32Array.from(picks, (p) => p.mode),
    isPhase: Uint8Array.from(picks, (p) => (p.kind === 'phase' ? 1 : 0)),
    wave: Uint8Array.from(picks, (p) => (p.wave === 'rayleigh' ? 1 : 0)),
  };
  const predicted = new Float64Array(n);
  predictPicks({ ...fp, order: trackingOrder(fp) }, model, predicted);
  let s = 0;
  picks.forEach((p, i) => (s += ((p.velocity - predicted[i]) / p.sd!) ** 2));
  return s;
}

const P68 = 0.6826894921370859;
const P95 = 0.95;

/**
 * Throws unless every per-parameter and pooled rate of `r` lies within 3
 * binomial standard deviations, 3·√(p(1 − p)/N), of the nominal p (68.27 %
 * or 95 %), N the number of trials (header of profile-coverage.test.ts).
 */
export function expectRates(r: CoverageReport) {
  const checks: Array<[string, number]> = [];
  for (const { parameter, rate68, rate95 } of r.rates) checks.push([`${parameter} 68 %`, rate68], [`${parameter} 95 %`, rate95]);
  checks.push(['pooled 68 %', r.pooled68], ['pooled 95 %', r.pooled95]);
  for (const [what, rate] of checks) {
    const p = what.endsWith('68 %') ? P68 : P95;
    const band = 3 * Math.sqrt((p * (1 - p)) / r.trials);
    if (!(Math.abs(rate - p) <= band)) {
      throw new Error(`${r.name}, ${what}: observed ${rate} over ${r.trials} trials, nominal ${p}, allowed ±${band.toFixed(4)} (3 binomial sd)`);
    }
  }
}
