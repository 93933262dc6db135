/**
 * Root refinement on a bracket.
 *
 * Method: Brent's method (Brent 1973, *Algorithms for Minimization without
 * Derivatives*, ch. 4): inverse quadratic interpolation and secant steps,
 * falling back to bisection, so it keeps the bracket and converges
 * superlinearly on smooth functions.
 *
 * Domain: any continuous f on [a, b] with f(a)·f(b) ≤ 0.
 * Accuracy: |x − x*| ≤ 2·eps·|x| + xtol/2 on return with status 'converged'.
 *
 * A solver that does not converge returns an outcome, never a silent number.
 */

export type RootStatus = 'converged' | 'max-iterations' | 'bracket-lost';

export interface RootOutcome {
  status: RootStatus;
  /** Best estimate of the root (NaN when the bracket was lost). */
  x: number;
  /** f at x: the residual. */
  fx: number;
  /** Function evaluations used, not counting the two end values passed in. */
  iterations: number;
}

export interface RootOptions {
  /** Absolute tolerance in x. @default 0 */
  xtol?: number;
  /** Relative tolerance in x. @default 4e-16 */
  rtol?: number;
  /** Evaluation limit. @default 100 */
  maxIterations?: number;
}

export const ROOT_DEFAULTS: Required<RootOptions> = { xtol: 0, rtol: 4e-16, maxIterations: 100 };

/**
 * Brent's method on [a, b]. `fa` and `fb` may be passed when already known.
 * Returns 'bracket-lost' when f(a) and f(b) have the same strict sign.
 */
export function brent(
  f: (x: number) => number,
  a: number,
  b: number,
  fa: number = f(a),
  fb: number = f(b),
  options: RootOptions = {},
): RootOutcome {
  const xtol = options.xtol ?? ROOT_DEFAULTS.xtol;
  const rtol = options.rtol ?? ROOT_DEFAULTS.rtol;
  const maxIterations = options.maxIterations ?? ROOT_DEFAULTS.maxIterations;

  if (fa === 0) return { status: 'converged', x: a, fx: 0, iterations: 0 };
  if (fb === 0) return { status: 'converged', x: b, fx: 0, iterations: 0 };
  if (!(fa * fb < 0)) return { status: 'bracket-lost', x: NaN, fx: NaN, iterations: 0 };

  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iter = 1; iter <= maxIterations; iter++) {
    if (fb * fc > 0) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * rtol * Math.abs(b) + 0.5 * xtol;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol || fb === 0) {
      return { status: 'converged', x: b, fx: fb, iterations: iter - 1 };
    }
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      let p: number;
      let q: number;
      const s = fb / fa;
      if (a === c) {
        p = 2 * m * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m;
        e = m;
      }
    } else {
      d = m;
      e = m;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = f(b);
  }
  return { status: 'max-iterations', x: b, fx: fb, iterations: maxIterations };
}
