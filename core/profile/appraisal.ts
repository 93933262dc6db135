/**
 * Appraisal of a fit by an ensemble: a random walk that visits models in
 * proportion to their likelihood, and the quantiles of that ensemble.
 *
 * What: models u (the estimate's log parameters) drawn with density
 * ∝ exp(−χ²(u) / (2T)) inside the search box (flat priors on the log
 * parameters), T ≥ 1 the interval scale (1 for a fit consistent with the
 * stated pick errors).
 *
 * Method: the random-walk Metropolis algorithm (Metropolis, Rosenbluth,
 * Rosenbluth, Teller & Teller 1953, J. Chem. Phys. 21:1087; Hastings 1970,
 * Biometrika 57:97) with Gaussian proposals shaped by a covariance C (the
 * estimate gives the Gauss–Newton covariance at the best fit, regularised by
 * the box) and scaled by s = 2.38/√k (Gelman, Roberts & Gilks 1996,
 * Bayesian Statistics 5:599), s adapted during burn-in only, towards an
 * acceptance rate of about a quarter (Roberts, Gelman & Gilks 1997, Ann.
 * Appl. Probab. 7:110). Halfway through burn-in (and again at three
 * quarters) the proposal takes the shape of the chain's own covariance so
 * far (adaptive Metropolis, Haario, Saksman & Tamminen 2001, Bernoulli
 * 7:223), which follows a curved or stretched likelihood that the
 * Gauss–Newton covariance at the best fit only sees locally. Nothing
 * adapts after burn-in, so the kept samples come from one fixed
 * Metropolis kernel. Samples after burn-in are kept. Quantiles are
 * type 7 of Hyndman & Fan (1996, Am. Stat. 50:361), the usual linear
 * interpolation between order statistics.
 *
 * For a likelihood close to Gaussian in u the central 68.27 % and 95 %
 * intervals of the ensemble match the Δχ² = 1 and 3.84 profile intervals
 * (Press et al., *Numerical Recipes*, 3rd ed. 2007, §15.6); the coverage
 * tests check how close. Randomness comes from the caller's seeded generator.
 */

/** Chain sizes. */
export interface ChainOptions {
  /** Steps kept after burn-in. */
  steps: number;
  /** Steps run first and thrown away, while the proposal scale adapts. */
  burnIn: number;
}

/** The kept models, row-major (count × k), with their χ². */
export interface Chain {
  k: number;
  count: number;
  samples: Float64Array;
  chi2: Float64Array;
  /** Fraction of proposals accepted after burn-in. */
  acceptance: number;
}

/** Lower Cholesky factor of a k×k symmetric matrix (row-major), or null when it is not positive definite. */
export function cholesky(a: ArrayLike<number>, k: number): Float64Array | null {
  const l = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[i * k + j];
      for (let m = 0; m < j; m++) s -= l[i * k + m] * l[j * k + m];
      if (i === j) {
        if (!(s > 0)) return null;
        l[i * k + i] = Math.sqrt(s);
      } else {
        l[i * k + j] = s / l[j * k + j];
      }
    }
  }
  return l;
}

/**
 * Runs the chain from `start` (χ² `startChi2`, finite). `chi2Of(u)` returns
 * +∞ (or NaN) for a model outside the box or the physical domain: such a
 * proposal is refused. `gauss()` gives standard normals, `uniform()` [0, 1).
 */
export function metropolisChain(
  chi2Of: (u: Float64Array) => number,
  start: ArrayLike<number>,
  startChi2: number,
  covariance: ArrayLike<number>,
  temperature: number,
  uniform: () => number,
  gauss: () => number,
  options: ChainOptions,
  onStep?: (done: number, total: number) => void,
): Chain {
  const k = start.length;
  let factor = cholesky(covariance, k);
  if (!factor) {
    factor = new Float64Array(k * k);
    for (let i = 0; i < k; i++) factor[i * k + i] = Math.sqrt(Math.max(Math.abs(covariance[i * k + i]), 1e-12));
  }
  let scale = 2.38 / Math.sqrt(k);
  const u = Float64Array.from(start);
  let chi2 = startChi2;
  const trial = new Float64Array(k);
  const z = new Float64Array(k);
  const samples = new Float64Array(options.steps * k);
  const kept = new Float64Array(options.steps);
  const total = options.burnIn + options.steps;
  let accepted = 0;
  let windowAccepted = 0;
  const window = 50;
  // Running mean and scatter of the burn-in states (Welford), for the adaptive proposal.
  const mean = new Float64Array(k);
  const scatter = new Float64Array(k * k);
  const delta = new Float64Array(k);
  let burnAccepted = 0;
  const adaptAt = options.burnIn >= ADAPT_MIN_BURN_IN ? [Math.floor(options.burnIn / 2), Math.floor((3 * options.burnIn) / 4)] : [];
  for (let step = 0; step < total; step++) {
    for (let i = 0; i < k; i++) z[i] = gauss();
    for (let i = 0; i < k; i++) {
      let s = 0;
      for (let j = 0; j <= i; j++) s += factor[i * k + j] * z[j];
      trial[i] = u[i] + scale * s;
    }
    const c = chi2Of(trial);
    let take = false;
    if (Number.isFinite(c)) {
      const logRatio = -(c - chi2) / (2 * temperature);
      take = logRatio >= 0 || uniform() < Math.exp(logRatio);
    }
    if (take) {
      u.set(trial);
      chi2 = c;
      windowAccepted++;
      if (step >= options.burnIn) accepted++;
      else burnAccepted++;
    }
    if (step < options.burnIn) {
      const n = step + 1;
      for (let i = 0; i < k; i++) {
        delta[i] = u[i] - mean[i];
        mean[i] += delta[i] / n;
      }
      for (let i = 0; i < k; i++) for (let j = 0; j <= i; j++) scatter[i * k + j] += delta[i] * (u[j] - mean[j]);
      if (adaptAt.includes(n) && burnAccepted >= 5 * k) {
        const shaped = adaptedFactor(scatter, n, covariance, k);
        if (shaped) {
          factor = shaped;
          scale = 2.38 / Math.sqrt(k);
        }
      }
      if ((step + 1) % window === 0) {
        const rate = windowAccepted / window;
        if (rate < 0.15) scale *= 0.7;
        else if (rate > 0.4) scale *= 1.3;
        windowAccepted = 0;
      }
    } else {
      const row = step - options.burnIn;
      samples.set(u, row * k);
      kept[row] = chi2;
    }
    if (onStep && (step + 1) % 100 === 0) onStep(step + 1, total);
  }
  return { k, count: options.steps, samples, chi2: kept, acceptance: options.steps > 0 ? accepted / options.steps : NaN };
}

/** Fewest burn-in steps for which the proposal adapts its shape (the covariance of fewer states is too rough). */
export const ADAPT_MIN_BURN_IN = 200;

/**
 * Cholesky factor of the chain's covariance so far (scatter / (n − 1), lower
 * triangle filled), plus 1e-6 of the starting covariance's diagonal so that
 * a direction the chain has not yet moved in keeps a little room (Haario et
 * al. 2001 add such a small ε·I); null when it is not positive definite.
 */
function adaptedFactor(scatter: Float64Array, n: number, start: ArrayLike<number>, k: number): Float64Array | null {
  const c = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j <= i; j++) {
      const v = scatter[i * k + j] / (n - 1);
      c[i * k + j] = v;
      c[j * k + i] = v;
    }
    c[i * k + i] += 1e-6 * Math.abs(start[i * k + i]);
  }
  return cholesky(c, k);
}

/** Quantile q of a sorted array (Hyndman & Fan 1996, type 7); NaN when empty. */
export function quantileSorted(sorted: ArrayLike<number>, q: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** The central 68.27 % and 95 % limits of the central normal probabilities: Φ(±1) and Φ(±1.96). */
export const QUANTILE_68: readonly [number, number] = [0.15865525393145707, 0.8413447460685429];
export const QUANTILE_95: readonly [number, number] = [0.025, 0.975];
