/**
 * Weighted least squares for a few parameters inside a box.
 *
 * What: minimises χ²(p) = Σ r_i(p)² over p in [lower, upper], where the
 * caller's residuals are already divided by their standard deviations.
 *
 * Method: Levenberg–Marquardt (Levenberg 1944, Q. Appl. Math. 2:164;
 * Marquardt 1963, J. SIAM 11:431), in the form of Press et al., *Numerical
 * Recipes*, 3rd ed. 2007, §15.5.2: solve (JᵀJ + λ·diag(JᵀJ)) δ = −Jᵀr,
 * accept the step when χ² falls (λ /= 10), otherwise raise λ (×10). Steps
 * are projected back into the box (a projected variant, common practice).
 * The Jacobian comes from forward differences unless the caller gives one.
 *
 * Domain: k ≤ ~6 parameters (dense normal equations, Gaussian elimination
 * with partial pivoting). Units are the caller's.
 * Accuracy: stops when the relative χ² decrease and the step are both below
 * `tolerance`, or χ² is below `chi2Floor`; reports an outcome, never a silent
 * number.
 */

export type FitStatus = 'converged' | 'max-iterations' | 'no-finite-start' | 'stopped';

export interface FitOutcome {
  status: FitStatus;
  /** The parameters at the end (a fresh array). */
  p: Float64Array;
  /** χ² at p. */
  chi2: number;
  /** Iterations (Jacobian evaluations). */
  iterations: number;
  /** JᵀJ at p (k×k, row-major): half the Hessian of χ² in the Gauss–Newton sense ('stopped': at the start of the last step). */
  normal: Float64Array;
}

export interface FitOptions {
  /** Relative tolerance on the χ² decrease and on the step. @default 1e-12 */
  tolerance?: number;
  /** χ² below which the fit counts as exact. @default 1e-26 */
  chi2Floor?: number;
  /** Iteration limit. @default 100 */
  maxIterations?: number;
  /** Forward-difference step in the parameters' own units. @default 1e-7 */
  diffStep?: number;
  /**
   * Asked after each accepted step with the parameters and χ²: true stops
   * the fit there with status 'stopped' (for example when it has reached a
   * minimum already found from another start). @default never
   */
  stopWhen?: (p: Float64Array, chi2: number) => boolean;
}

export const FIT_DEFAULTS: Required<Omit<FitOptions, 'stopWhen'>> = {
  tolerance: 1e-12,
  chi2Floor: 1e-26,
  maxIterations: 100,
  diffStep: 1e-7,
};

/** Fills `out` (length m) with the weighted residuals at p. */
export type ResidualFn = (p: Float64Array, out: Float64Array) => void;

function sumSquares(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return s;
}

/** Solves A x = b (k×k, row-major) in place by Gaussian elimination with partial pivoting; false if singular. */
export function solveSmall(a: Float64Array, b: Float64Array, k: number): boolean {
  for (let c = 0; c < k; c++) {
    let piv = c;
    for (let r = c + 1; r < k; r++) if (Math.abs(a[r * k + c]) > Math.abs(a[piv * k + c])) piv = r;
    if (!(Math.abs(a[piv * k + c]) > 0)) return false;
    if (piv !== c) {
      for (let j = 0; j < k; j++) {
        const t = a[c * k + j];
        a[c * k + j] = a[piv * k + j];
        a[piv * k + j] = t;
      }
      const t = b[c];
      b[c] = b[piv];
      b[piv] = t;
    }
    for (let r = c + 1; r < k; r++) {
      const f = a[r * k + c] / a[c * k + c];
      if (f === 0) continue;
      for (let j = c; j < k; j++) a[r * k + j] -= f * a[c * k + j];
      b[r] -= f * b[c];
    }
  }
  for (let r = k - 1; r >= 0; r--) {
    let s = b[r];
    for (let j = r + 1; j < k; j++) s -= a[r * k + j] * b[j];
    b[r] = s / a[r * k + r];
  }
  return true;
}

/** Inverse of a small symmetric matrix (k×k row-major); null when singular. */
export function invertSmall(a: Float64Array, k: number): Float64Array | null {
  const inv = new Float64Array(k * k);
  for (let c = 0; c < k; c++) {
    const m = Float64Array.from(a);
    const e = new Float64Array(k);
    e[c] = 1;
    if (!solveSmall(m, e, k)) return null;
    for (let r = 0; r < k; r++) inv[r * k + c] = e[r];
  }
  return inv;
}

/**
 * Levenberg–Marquardt from p0 (clamped into the box) for `m` residuals.
 * `project` may further map a trial point onto a feasible set (for example
 * to keep one speed above another); it must be idempotent.
 */
export function levenbergMarquardt(
  residuals: ResidualFn,
  m: number,
  p0: ArrayLike<number>,
  lower: ArrayLike<number>,
  upper: ArrayLike<number>,
  options: FitOptions = {},
  project?: (p: Float64Array) => void,
): FitOutcome {
  const tol = options.tolerance ?? FIT_DEFAULTS.tolerance;
  const floor = options.chi2Floor ?? FIT_DEFAULTS.chi2Floor;
  const maxIt = options.maxIterations ?? FIT_DEFAULTS.maxIterations;
  const hStep = options.diffStep ?? FIT_DEFAULTS.diffStep;
  const k = p0.length;
  const clampInto = (p: Float64Array) => {
    for (let j = 0; j < k; j++) p[j] = Math.min(upper[j], Math.max(lower[j], p[j]));
    if (project) project(p);
  };

  const p = Float64Array.from(p0);
  clampInto(p);
  const r = new Float64Array(m);
  const rt = new Float64Array(m);
  const rh = new Float64Array(m);
  const J = new Float64Array(m * k);
  const JtJ = new Float64Array(k * k);
  const g = new Float64Array(k);
  const A = new Float64Array(k * k);
  const step = new Float64Array(k);
  const trial = new Float64Array(k);

  residuals(p, r);
  let chi2 = sumSquares(r);
  if (!Number.isFinite(chi2)) return { status: 'no-finite-start', p, chi2, iterations: 0, normal: JtJ };

  const jacobian = () => {
    for (let j = 0; j < k; j++) {
      // Step away from the nearer bound so the difference stays inside the box.
      const hj = p[j] + hStep > upper[j] ? -hStep : hStep;
      const save = p[j];
      p[j] = save + hj;
      residuals(p, rh);
      p[j] = save;
      for (let i = 0; i < m; i++) J[i * k + j] = (rh[i] - r[i]) / hj;
    }
    JtJ.fill(0);
    g.fill(0);
    for (let i = 0; i < m; i++) {
      for (let a = 0; a < k; a++) {
        const Jia = J[i * k + a];
        g[a] += Jia * r[i];
        for (let b = a; b < k; b++) JtJ[a * k + b] += Jia * J[i * k + b];
      }
    }
    for (let a = 0; a < k; a++) for (let b = 0; b < a; b++) JtJ[a * k + b] = JtJ[b * k + a];
  };

  let lambda = 1e-3;
  let it = 0;
  for (; it < maxIt; it++) {
    if (chi2 <= floor) {
      jacobian();
      return { status: 'converged', p, chi2, iterations: it, normal: Float64Array.from(JtJ) };
    }
    jacobian();
    let accepted = false;
    let stepNorm = 0;
    let improvement = 0;
    for (let tries = 0; tries < 30; tries++) {
      A.set(JtJ);
      for (let a = 0; a < k; a++) A[a * k + a] += lambda * (JtJ[a * k + a] > 0 ? JtJ[a * k + a] : 1e-12);
      for (let a = 0; a < k; a++) step[a] = -g[a];
      if (!solveSmall(A, step, k)) {
        lambda *= 10;
        continue;
      }
      for (let a = 0; a < k; a++) trial[a] = p[a] + step[a];
      clampInto(trial);
      let moved = 0;
      for (let a = 0; a < k; a++) moved = Math.max(moved, Math.abs(trial[a] - p[a]) / Math.max(1, Math.abs(p[a])));
      if (moved <= 1e-15) break; // the step vanished: nothing left to gain
      residuals(trial, rt);
      const c2 = sumSquares(rt);
      if (Number.isFinite(c2) && c2 <= chi2) {
        stepNorm = 0;
        for (let a = 0; a < k; a++) stepNorm = Math.max(stepNorm, Math.abs(trial[a] - p[a]) / Math.max(1, Math.abs(p[a])));
        improvement = chi2 - c2;
        p.set(trial);
        r.set(rt);
        chi2 = c2;
        lambda = Math.max(lambda / 10, 1e-12);
        accepted = true;
        break;
      }
      lambda *= 10;
      if (lambda > 1e16) break;
    }
    if (!accepted) {
      // No downhill step at any damping: a (possibly constrained) minimum.
      jacobian();
      return { status: 'converged', p, chi2, iterations: it + 1, normal: Float64Array.from(JtJ) };
    }
    if (improvement <= tol * Math.max(chi2, floor) && stepNorm <= Math.sqrt(tol)) {
      jacobian();
      return { status: 'converged', p, chi2, iterations: it + 1, normal: Float64Array.from(JtJ) };
    }
    if (options.stopWhen?.(p, chi2)) {
      // No fresh Jacobian: `normal` is JᵀJ from the start of this last step.
      return { status: 'stopped', p, chi2, iterations: it + 1, normal: Float64Array.from(JtJ) };
    }
  }
  jacobian();
  return { status: 'max-iterations', p, chi2, iterations: it, normal: Float64Array.from(JtJ) };
}
