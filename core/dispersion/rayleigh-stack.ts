/**
 * Rayleigh waves in N layers over a half-space: every mode's phase velocity
 * at a frequency, its group velocity, and the half-space Rayleigh speed.
 *
 * What: the phase velocities c_0 < c_1 < … of the Rayleigh (P-SV) modes at
 * angular frequency ω, numbered by order (mode n is the (n+1)-th slowest
 * root at that frequency), for β_floor < c ≤ β_H; U = dω/dk of each.
 *
 * Method: the secular function of rayleigh-secular.ts (compound matrices,
 * Dunkin 1965, BSSA 55:335–358, normalised per layer) is continuous in c
 * with no poles, so each simple root is a sign change. P-SV has no Sturm
 * count like SH, so roots are isolated by a scan fine enough that F cannot
 * turn twice between grid points without being seen:
 *
 *  - the step in c keeps the total vertical phase
 *    Φ(c) = ω Σ_j d_j (√(1/β_j² − 1/c²)₊ + √(1/α_j² − 1/c²)₊)
 *    from advancing by more than π/4 (F oscillates with these phases), and
 *    never exceeds 4 % of c (for the roots that no phase drives, such as
 *    the fundamental in the evanescent range or interface waves);
 *  - where |F| has a local minimum between two grid points of one sign,
 *    the minimum is searched (golden section); if F changes sign there, the
 *    two close roots of an osculation (two branches that nearly touch, e.g.
 *    a mode of a buried low-velocity layer meeting one of the crust) are
 *    both reported; if it does not, the outcome notes the close approach;
 *  - each sign change is refined by Brent's method (core/numeric/roots.ts).
 *
 * The scan starts at c_floor = 0.9 × the slowest Rayleigh speed of any
 * layer or the half-space, below which the modes of a layered half-space
 * are not expected (the slowest possible guided wave is the Rayleigh wave
 * of the slowest solid); test/unit/core/dispersion/rayleigh-random.test.ts
 * scans from 0.3·β_min on seeded random models to check this.
 *
 * Group velocity: U = dω/dk along F(c, k) = 0 with ω = ck, by implicit
 * differentiation, U = c − k·F_k/F_c, with F_k and F_c exact (forward
 * differentiation of the recursion, rayleigh-secular.ts); the tests check
 * it against the energy form of the thin-layer method and a central
 * difference of the phase velocity.
 *
 * Half-space: Rayleigh's equation (2 − ξ)² = 4√(1 − ξβ²/α²)√(1 − ξ), ξ = c²/β²
 * (Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §5.1), solved by
 * Brent on ξ ∈ (0.01, 1).
 *
 * Domain and units: SI; ω > 0 rad/s; the model validated with its P speeds
 * (model.ts validateRayleighModel). Accuracy: roots to about 1e-14
 * relative (Brent's tolerance, limited by the conditioning of F); group
 * velocity to about 1e-10 relative.
 */
import { brent, type RootStatus } from '../numeric/roots';
import { rayleighSecular, rayleighSecularDerivatives, type RayleighStack } from './rayleigh-secular';

export { prepareRayleighStack, rayleighSecular, type RayleighStack } from './rayleigh-secular';

/**
 * Rayleigh speed (m/s) of a homogeneous half-space with shear speed vs and
 * P speed vp (vp/vs > √(4/3)); NaN outside that domain.
 */
export function rayleighHalfspaceSpeed(vs: number, vp: number): number {
  const p = (vs * vs) / (vp * vp);
  if (!(vs > 0) || !(p < 0.75)) return NaN;
  const f = (xi: number): number => (2 - xi) * (2 - xi) - 4 * Math.sqrt(1 - p * xi) * Math.sqrt(1 - xi);
  const r = brent(f, 0.01, 1);
  return r.status === 'converged' ? vs * Math.sqrt(r.x) : NaN;
}

/** Lower end of the root scan, m/s: 0.9 × the slowest Rayleigh speed of any layer or the half-space. */
export function rayleighSearchFloor(s: RayleighStack): number {
  let low = rayleighHalfspaceSpeed(s.vsH, s.vpH);
  for (let j = 0; j < s.count; j++) low = Math.min(low, rayleighHalfspaceSpeed(s.vs[j], s.vp[j]));
  return 0.9 * low;
}

/** Largest advance of the vertical phase Φ between grid points, rad. */
const PHASE_STEP = Math.PI / 4;
/** Largest relative step in c between grid points. */
const RELATIVE_STEP = 0.04;
/** Two roots closer than this (relative) are reported as a close approach of two branches. */
export const CLOSE_ROOTS_RTOL = 1e-3;
/** Golden-section iterations when probing a local minimum of |F|. */
const PROBE_ITERATIONS = 40;

/** A pair of roots (or a near miss) so close that two branches osculate or cross there. */
export interface CloseApproach {
  /** Lower mode number of the pair (the pair is mode, mode + 1); −1 for a near miss without roots. */
  mode: number;
  /** Phase velocity where they meet, m/s. */
  c: number;
  /** Separation of the two roots, m/s (0 for a near miss). */
  gap: number;
}

export interface RayleighSolveOutcome {
  /** 'converged' when every root written converged. */
  status: RootStatus;
  /** Roots written to the output. */
  found: number;
  /** True when the scan reached β_H, so `found` is every mode at this frequency. */
  complete: boolean;
  /** Largest |F| at a returned root relative to |F| at its bracket's ends. */
  worstResidual: number;
  /** Evaluations of the secular function used. */
  evaluations: number;
  /** Close pairs of roots and near misses met by the scan (normally empty). */
  close: CloseApproach[];
}

/**
 * Finds the phase velocities of the lowest `modes` Rayleigh modes at ω, in
 * ascending order (mode 0 first). One instance keeps its scratch and its
 * last outcome; it is not re-entrant.
 */
export class RayleighStackSolver {
  readonly stack: RayleighStack;
  /** Lower end of the scan, m/s. */
  readonly floor: number;
  /** Outcome of the last `solve`. */
  readonly outcome: RayleighSolveOutcome = {
    status: 'converged',
    found: 0,
    complete: false,
    worstResidual: 0,
    evaluations: 0,
    close: [],
  };
  private omega = 0;
  private readonly f = (c: number): number => {
    this.outcome.evaluations++;
    return rayleighSecular(this.stack, this.omega, c);
  };

  constructor(stack: RayleighStack) {
    this.stack = stack;
    this.floor = rayleighSearchFloor(stack);
  }

  /** Total vertical phase Φ(c) (header). */
  private phase(c: number): number {
    const s = this.stack;
    const ic2 = 1 / (c * c);
    let sum = 0;
    for (let j = 0; j < s.count; j++) {
      const b = 1 / (s.vs[j] * s.vs[j]) - ic2;
      const a = 1 / (s.vp[j] * s.vp[j]) - ic2;
      sum += s.thickness[j] * ((b > 0 ? Math.sqrt(b) : 0) + (a > 0 ? Math.sqrt(a) : 0));
    }
    return this.omega * sum;
  }

  /** Next grid point after c (at most `top`). */
  private nextPoint(c: number, phi: number, top: number): number {
    let dc = RELATIVE_STEP * c;
    for (let i = 0; i < 30; i++) {
      const c1 = Math.min(c + dc, top);
      const dphi = this.phase(c1) - phi;
      if (dphi <= PHASE_STEP) return c1;
      dc *= Math.max(0.1, (0.9 * PHASE_STEP) / dphi);
    }
    return Math.min(c + dc, top);
  }

  /**
   * Writes c_0 < c_1 < … (m/s) for the lowest min(modes, present) modes at
   * ω (rad/s) into out[0…]; returns how many were written. Check
   * `outcome.status`: a root that did not converge is written as NaN.
   */
  solve(omega: number, modes: number, out: Float64Array): number {
    const o = this.outcome;
    o.status = 'converged';
    o.found = 0;
    o.complete = false;
    o.worstResidual = 0;
    o.evaluations = 0;
    o.close = [];
    if (!(omega > 0) || modes <= 0 || !(this.floor > 0)) return 0;
    this.omega = omega;
    const top = this.stack.vsH;
    let c0 = this.floor;
    let f0 = this.f(c0);
    let phi0 = this.phase(c0);
    let fPrev = NaN;
    let cPrev = NaN;
    while (o.found < modes) {
      if (c0 >= top) {
        o.complete = true;
        break;
      }
      const c1 = this.nextPoint(c0, phi0, top);
      const f1 = this.f(c1);
      let roots = false;
      if (f1 === 0 || f0 * f1 < 0) {
        this.refine(c0, f0, c1, f1, out, modes);
        roots = true;
      } else if (f0 !== 0 && f0 * fPrev > 0 && Math.abs(f0) < Math.abs(fPrev) && Math.abs(f0) <= Math.abs(f1)) {
        roots = this.probe(cPrev, fPrev, c0, f0, c1, f1, out, modes);
      }
      // After roots in (c0, c1) the next triple must not probe that interval again.
      cPrev = c0;
      fPrev = roots ? NaN : f0;
      c0 = c1;
      f0 = f1;
      phi0 = this.phase(c1);
    }
    // Close pairs among the roots found.
    for (let i = 0; i + 1 < o.found; i++) {
      const gap = out[i + 1] - out[i];
      if (gap <= CLOSE_ROOTS_RTOL * out[i + 1]) o.close.push({ mode: i, c: 0.5 * (out[i] + out[i + 1]), gap });
    }
    return o.found;
  }

  /**
   * |F| has a local minimum near c0 with no sign change: search the
   * minimum of sign·F on (ca, cb) by golden section; two roots if F turns
   * over there.
   */
  private probe(ca: number, fa: number, c0: number, f0: number, cb: number, fb: number, out: Float64Array, modes: number): boolean {
    const sg = f0 > 0 ? 1 : -1;
    const g = 0.3819660112501051;
    let a = ca;
    let b = cb;
    let x = c0;
    let fx = sg * f0;
    for (let i = 0; i < PROBE_ITERATIONS; i++) {
      const left = x - a > b - x;
      const u = left ? x - g * (x - a) : x + g * (b - x);
      const fu = sg * this.f(u);
      if (fu < 0) {
        // Two roots: in (ca, u) and (u, cb), each a sign change.
        this.refine(ca, fa, u, sg * fu, out, modes);
        this.refine(u, sg * fu, cb, fb, out, modes);
        return true;
      }
      if (fu < fx) {
        if (left) b = x;
        else a = x;
        x = u;
        fx = fu;
      } else if (left) a = u;
      else b = u;
      if (b - a <= 1e-13 * b) break;
    }
    // No sign change: a near miss (tangency within rounding, or two branches passing close).
    const scale = Math.max(Math.abs(fa), Math.abs(fb));
    if (fx <= 1e-9 * scale) this.outcome.close.push({ mode: -1, c: x, gap: 0 });
    return false;
  }

  private refine(a: number, fa: number, b: number, fb: number, out: Float64Array, modes: number): void {
    const o = this.outcome;
    if (o.found >= modes) return;
    const r = brent(this.f, a, b, fa, fb);
    if (r.status === 'converged') {
      out[o.found] = r.x;
      const scale = Math.max(Math.abs(fa), Math.abs(fb));
      const rel = scale > 0 ? Math.abs(r.fx) / scale : 0;
      if (rel > o.worstResidual) o.worstResidual = rel;
    } else {
      out[o.found] = NaN;
      if (o.status === 'converged') o.status = r.status;
    }
    o.found++;
  }
}

const derivatives = { value: 0, dc: 0, dk: 0 };

/**
 * Group velocity U (m/s) of the Rayleigh mode with phase velocity c (m/s)
 * at ω (rad/s): U = c − k·F_k/F_c (header). NaN when c is not below β_H or
 * F_c vanishes (a double root).
 */
export function rayleighStackGroupVelocity(s: RayleighStack, omega: number, c: number): number {
  if (!(c > 0 && c < s.vsH) || !(omega > 0)) return NaN;
  const d = rayleighSecularDerivatives(s, omega, c, derivatives);
  if (!(d.dc !== 0)) return NaN;
  const k = omega / c;
  return c - (k * d.dk) / d.dc;
}
