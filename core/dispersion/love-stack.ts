/**
 * Love waves in N layers over a half-space: the Thomson–Haskell SH
 * propagator, its secular function, a Sturm count of the modes, and a root
 * solver that finds every mode once.
 *
 * What: phase velocities c_n(ω) of the Love modes n = 0, 1, 2, … of a stack
 * of homogeneous isotropic layers over a half-space, and the cutoff
 * frequencies of the overtones.
 *
 * Method: the motion–stress vector (l, τ = μ dl/dz) is propagated down from
 * the free surface, where (l, τ) = (1, 0), by the layer matrices of Thomson
 * (1950, J. Appl. Phys. 21:89) and Haskell (1953, BSSA 43:17–34), in the SH
 * form of Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §7.2:
 *
 *   c > β:  ν = k√(c²/β² − 1),  P = [[cos νd, sin νd/(μν)], [−μν sin νd, cos νd]]
 *   c < β:  γ = k√(1 − c²/β²),  P = [[cosh γd, sinh γd/(μγ)], [μγ sinh γd, cosh γd]]
 *   c = β:  P = [[1, d/μ], [0, 1]]   (the limit of both; reached continuously here)
 *
 * with k = ω/c and det P = 1. The evanescent matrix is multiplied by e^(−γd)
 * (entries (1 ± e^(−2γd))/2), so nothing overflows at high frequency, and
 * the state is renormalised to size |l| + |τ|/(μ_H k) = 1 whenever it leaves
 * [2^−128, 2^128] (many strong contrasts otherwise overflow it); the
 * positive factors dropped do not change any sign. The secular function at
 * the top of the half-space is
 *
 *   F(c) = τ + μ_H γ_H l,   γ_H = k√(1 − c²/β_H²),
 *
 * continuous in c on (β_min, β_H] up to those positive rescalings, with no
 * poles (a rescaling is a jump in size, never in sign, so Brent's bracket
 * still closes on a root).
 *
 * Bracket verification (Sturm–Liouville argument). At fixed ω, SH motion
 * obeys (μ l′)′ + (ω²ρ − k²μ) l = 0, a Sturm–Liouville problem in the
 * eigenvalue −k² with weight μ > 0; its eigenvalues are simple and mode n
 * has exactly n nodes of l(z) (Aki & Richards §7.2; Courant & Hilbert,
 * *Methods of Mathematical Physics* I, ch. VI). Write l = r sin θ,
 * τ = r cos θ (the Prüfer angle, from θ = π/2 at the surface). Then
 * θ′ = τ²/(μ r²) + (ω²ρ − k²μ) l²/r², so θ crosses multiples of π only
 * upwards, exactly at the nodes of l, and (Sturm comparison) θ at the
 * half-space grows strictly with c. The half-space condition F = 0 reads
 * θ ≡ θ_B = π/2 + arctan(μ_H γ_H) (mod π), and θ_B falls as c rises. So
 * Θ(c) = θ(z_H) − θ_B is strictly increasing, F = −R sin Θ with R > 0, and
 *
 *   N(c) = #{modes with c_n < c} = #{n ≥ 0 : Θ(c) > nπ} = m + [(−1)^m F < 0],
 *
 * where m is the number of nodes of l above the half-space. m is counted
 * exactly while propagating: in an oscillatory layer the (modified) Prüfer
 * angle advances by exactly νd; in an evanescent layer l has at most one
 * node. The solver isolates each mode by bisection on N(c) until a bracket
 * holds exactly one root (so F changes sign there, and only once), then
 * refines it with Brent's method (core/numeric/roots.ts). No mode can be missed or
 * found twice, whatever the layering: low-velocity layers at depth, close
 * roots near cutoffs, thin or very thick layers. Roots closer than the
 * floating-point spacing cannot be separated; that is reported as the
 * outcome 'inseparable', never as a silent number. Every search is bounded:
 * at most EVALUATIONS_PER_MODE propagations per requested mode, a count
 * that breaks its own order or a non-finite F ends the solve as 'unstable'.
 *
 * Domain and units: SI (m, s, rad/s, m/s, kg/m³); ω > 0, β_min < c ≤ β_H.
 * These functions do not validate: validate models once with model.ts.
 * Accuracy: roots to about 4e-16 relative in c (Brent's tolerance), limited
 * by the conditioning of F.
 */
import type { LayeredModel } from './model';
import { brent, type RootStatus } from '../numeric/roots';

/** A model prepared for the propagator: columns of layer properties. */
export interface LoveStack {
  /** Number of layers above the half-space. */
  readonly count: number;
  /** Layer thicknesses, m. */
  readonly thickness: Float64Array;
  /** Layer shear speeds β, m/s. */
  readonly vs: Float64Array;
  /** Layer densities ρ, kg/m³. */
  readonly density: Float64Array;
  /** Layer shear moduli μ = ρβ², Pa. */
  readonly mu: Float64Array;
  /** Half-space shear speed β_H, m/s. */
  readonly vsH: number;
  /** Half-space density ρ_H, kg/m³. */
  readonly densityH: number;
  /** Half-space shear modulus μ_H, Pa. */
  readonly muH: number;
  /** The slowest layer's shear speed: the lower end of the Love-wave range, m/s. */
  readonly vsMin: number;
  /** 1/β per layer, s/m (the propagator multiplies by it). */
  readonly invVs: Float64Array;
}

/** Copies a (validated) model into the propagator's columnar form. */
export function prepareLoveStack(model: LayeredModel): LoveStack {
  const n = model.layers.length;
  const thickness = new Float64Array(n);
  const vs = new Float64Array(n);
  const density = new Float64Array(n);
  const mu = new Float64Array(n);
  const invVs = new Float64Array(n);
  let vsMin = Infinity;
  for (let j = 0; j < n; j++) {
    const l = model.layers[j];
    thickness[j] = l.thickness;
    vs[j] = l.vs;
    density[j] = l.density;
    mu[j] = l.density * l.vs * l.vs;
    invVs[j] = 1 / l.vs;
    if (l.vs < vsMin) vsMin = l.vs;
  }
  const { vs: vsH, density: densityH } = model.halfspace;
  return { count: n, thickness, vs, density, mu, vsH, densityH, muH: densityH * vsH * vsH, vsMin, invVs };
}

/**
 * The scaled layer matrix of one layer, row-major into out[0..3]:
 * out = s·P with s = e^(−γd) for an evanescent layer (c < β) and s = 1
 * otherwise. Returns ln(1/s) = γd (0 when c ≥ β), so that
 * det(out) = e^(−2·returned) exactly in exact arithmetic (det P = 1).
 */
export function shLayerMatrix(
  out: Float64Array,
  thickness: number,
  vs: number,
  density: number,
  omega: number,
  c: number,
): number {
  const mu = density * vs * vs;
  const k = omega / c;
  if (c > vs) {
    const nu = (k * Math.sqrt((c - vs) * (c + vs))) / vs;
    const x = nu * thickness;
    const cs = Math.cos(x);
    const sn = Math.sin(x);
    out[0] = cs;
    out[1] = sn / (mu * nu);
    out[2] = -mu * nu * sn;
    out[3] = cs;
    return 0;
  }
  const g = (k * Math.sqrt((vs - c) * (vs + c))) / vs;
  const x = g * thickness;
  const e2 = Math.exp(-2 * x);
  const ch = 0.5 * (1 + e2);
  const sh = -0.5 * Math.expm1(-2 * x);
  out[0] = ch;
  out[1] = g === 0 ? thickness / mu : sh / (mu * g);
  out[2] = mu * g * sh;
  out[3] = ch;
  return x;
}

/** True when interval index m agrees with the signs of (l, τ): (−1)^m l > 0, or l = 0 and (−1)^m τ > 0. */
function agrees(m: number, l: number, t: number): boolean {
  const sl = m & 1 ? -l : l;
  return sl > 0 || (sl === 0 && (m & 1 ? -t : t) > 0);
}

/** The propagated state is renormalised to size 1 when its size leaves [RESCALE_BELOW, RESCALE_ABOVE]. */
const RESCALE_ABOVE = 2 ** 128;
const RESCALE_BELOW = 2 ** -128;

/** Results of one propagation, kept in module scratch (no per-call objects). */
const scratch = { l: 0, t: 0, nodes: 0, secular: 0 };

/**
 * Propagates (l, τ) from the surface to the top of the half-space at (ω, c),
 * scaled; counts the nodes of l when `countNodes` is set. Returns F(c).
 */
function propagate(s: LoveStack, omega: number, c: number, countNodes: boolean): number {
  const k = omega / c;
  // τ/(μ_H k) is dimensionless like l: the size |l| + |τ|/(μ_H k) is what is normalised.
  const invRef = c / (s.muH * omega);
  let l = 1;
  let t = 0;
  let m = 0;
  const { thickness, vs, mu, count, invVs } = s;
  for (let j = 0; j < count; j++) {
    const b = vs[j];
    const d = thickness[j];
    const u = mu[j];
    let l1: number;
    let t1: number;
    if (c > b) {
      const nu = k * Math.sqrt((c - b) * (c + b)) * invVs[j];
      const x = nu * d;
      const cs = Math.cos(x);
      const sn = Math.sin(x);
      const un = u * nu;
      l1 = cs * l + (sn / un) * t;
      t1 = cs * t - un * sn * l;
      if (countNodes) {
        // The modified Prüfer angle in (l, τ/(μν)) advances by exactly νd and
        // shares the quadrants, hence the π-intervals, of the plain angle: from
        // interval m it lands in m + ⌊νd/π⌋ or the next, whose parities differ,
        // so the sign of l (of τ where l = 0) at the layer's foot says which.
        let mNew = m + Math.floor(x / Math.PI);
        if (!agrees(mNew, l1, t1)) mNew += 1;
        m = mNew;
      }
    } else {
      const g = k * Math.sqrt((b - c) * (b + c)) * invVs[j];
      // e^(−2γd) − 1: expm1 where γd is small (exact there), exp (cheaper) where e^(−2γd) < 0.61, with no cancellation.
      const gd2 = 2 * g * d;
      const em = gd2 > 0.5 ? Math.exp(-gd2) - 1 : Math.expm1(-gd2);
      const ch = 1 + 0.5 * em; // cosh γd · e^(−γd)
      const sh = -0.5 * em; // sinh γd · e^(−γd)
      l1 = ch * l + (g === 0 ? d / u : sh / (u * g)) * t;
      t1 = ch * t + u * g * sh * l;
      // At most one node in an evanescent layer.
      if (countNodes && !agrees(m, l1, t1)) m += 1;
    }
    // Renormalise after every layer where the state has left [2^-128, 2^128]
    // in size: strong impedance contrasts grow (or shrink) it by the
    // contrast ratios even when every exponential is scaled out, and after
    // ~150 alternating layers it overflowed. One layer changes the size by
    // far less than 2^800, so nothing overflows between checks. A positive
    // factor changes no sign, so neither the roots nor the node count.
    // (Renormalising every layer unconditionally made F kinked in c and
    // Brent several times slower; this way a normal model is untouched.)
    const size = Math.abs(l1) + Math.abs(t1) * invRef;
    if (size > RESCALE_ABOVE || size < RESCALE_BELOW) {
      const inv = 1 / size;
      l = l1 * inv;
      t = t1 * inv;
    } else {
      l = l1;
      t = t1;
    }
  }
  const gH = (k * Math.sqrt(Math.max(0, (s.vsH - c) * (s.vsH + c)))) / s.vsH;
  const f = t + s.muH * gH * l;
  scratch.l = l;
  scratch.t = t;
  scratch.nodes = m;
  scratch.secular = f;
  return f;
}

/**
 * The secular function F(c) = τ + μ_H γ_H l at the top of the half-space,
 * at angular frequency ω (rad/s) and phase velocity c (m/s), scaled by a
 * positive factor (so its sign and roots are those of the unscaled F).
 */
export function loveSecular(s: LoveStack, omega: number, c: number): number {
  return propagate(s, omega, c, false);
}

/**
 * Number of nodes of l(z) above the half-space for the solution started at
 * the free surface, at (ω, c). For c just below the root c_n of mode n it
 * equals n (the Prüfer angle is then in [nπ + π/2, nπ + π)); so does the
 * eigenfunction of mode n (Sturm–Liouville). At the root itself, for a mode
 * trapped above a thick evanescent layer, the state at the half-space top is
 * below rounding noise (the decaying solution is lost in the scaled growing
 * one), so evaluate a little below the root, e.g. c_n·(1 − 1e-7).
 */
export function loveNodeCount(s: LoveStack, omega: number, c: number): number {
  propagate(s, omega, c, true);
  return scratch.nodes;
}

/**
 * Sturm count N(c): the number of Love modes at ω whose phase velocity is
 * below c (see the method header). N(β_H) is the number of modes present.
 */
export function loveModesBelow(s: LoveStack, omega: number, c: number): number {
  const f = propagate(s, omega, c, true);
  const m = scratch.nodes;
  return m + ((m & 1 ? -f : f) < 0 ? 1 : 0);
}

/** Number of Love modes present at ω (those with cutoff below ω). */
export function loveStackModeCount(s: LoveStack, omega: number): number {
  return loveModesBelow(s, omega, s.vsH);
}

/**
 * Why a stack solve gave up, beyond Brent's own outcomes: 'inseparable'
 * (roots closer than the floating-point spacing), 'unstable' (the secular
 * function was not finite or the Sturm count ran against its own order:
 * the arithmetic cannot be trusted for this model), 'evaluation-limit'
 * (the bound on propagator evaluations per solve was reached).
 */
export type StackSolveStatus = RootStatus | 'inseparable' | 'unstable' | 'evaluation-limit';

/** Solver outcome of the last call, kept by the solver (no per-call objects). */
export interface StackSolveOutcome {
  /** 'converged' when every requested root present converged. */
  status: StackSolveStatus;
  /** Modes present at this frequency (all of them, not only those requested). */
  present: number;
  /** Roots written to the output. */
  found: number;
  /** Largest |F| at a returned root, relative to the scale μ_H·k (dimensionless). */
  worstResidual: number;
  /** Evaluations of the propagator used. */
  evaluations: number;
}

/** Relative width below which two roots count as inseparable in double precision. */
const SEPARATION_RTOL = 4e-16;

/**
 * Propagator evaluations allowed per requested mode in one solve: isolating
 * a root by bisection on the count takes at most ~60 halvings of the
 * (β_min, β_H] range in double precision, and Brent at most 100 more
 * (core/numeric/roots.ts), so 200 is never reached by a solvable model; it
 * bounds the time of one solve whatever the model.
 */
export const EVALUATIONS_PER_MODE = 200;

/**
 * Finds the phase velocities of the lowest `modes` Love modes at ω, in
 * ascending order (mode 0 first). One instance keeps its scratch and its
 * last outcome; it is not re-entrant.
 */
export class LoveStackSolver {
  readonly stack: LoveStack;
  /** Outcome of the last `solve`. */
  readonly outcome: StackSolveOutcome = {
    status: 'converged',
    present: 0,
    found: 0,
    worstResidual: 0,
    evaluations: 0,
  };
  private omega = 0;
  private out: Float64Array = new Float64Array(0);
  private wanted = 0;
  private lastF = 0;
  private budget = 0;
  private readonly f = (c: number): number => {
    this.outcome.evaluations++;
    return propagate(this.stack, this.omega, c, false);
  };

  constructor(stack: LoveStack) {
    this.stack = stack;
  }

  /**
   * Writes c_0 < c_1 < … (m/s) for the lowest min(modes, present) modes at
   * ω (rad/s) into out[0…]; returns how many were written. Check
   * `outcome.status`: any root that did not converge is written as NaN.
   */
  solve(omega: number, modes: number, out: Float64Array): number {
    const o = this.outcome;
    o.status = 'converged';
    o.worstResidual = 0;
    o.evaluations = 0;
    o.found = 0;
    o.present = 0;
    if (!(omega > 0) || modes <= 0) return 0;
    this.omega = omega;
    this.out = out;
    const s = this.stack;
    const a = s.vsMin;
    const b = s.vsH;
    const na = this.count(a);
    const fa = this.lastF;
    const nb = this.count(b);
    const fb = this.lastF;
    if (!Number.isFinite(fa) || !Number.isFinite(fb) || nb < na) {
      // The count cannot be trusted, so neither can the number of modes.
      o.status = 'unstable';
      o.present = 0;
      return 0;
    }
    o.present = nb - na;
    this.wanted = Math.min(modes, nb - na);
    if (this.wanted <= 0) return 0;
    this.budget = EVALUATIONS_PER_MODE * (this.wanted + 1);
    this.isolate(a, na, fa, b, nb, fb, na);
    return this.wanted;
  }

  /** Marks roots first… (below limit) as not found, with the given status (the first failure's status is kept). */
  private giveUp(first: number, limit: number, status: StackSolveStatus): void {
    for (let i = first; i < Math.min(limit, this.wanted); i++) this.out[i] = NaN;
    if (this.outcome.status === 'converged') this.outcome.status = status;
  }

  /** Sturm count N(c); leaves F(c) in lastF for the bracket. */
  private count(c: number): number {
    this.outcome.evaluations++;
    const f = propagate(this.stack, this.omega, c, true);
    const m = scratch.nodes;
    this.lastF = f;
    return m + ((m & 1 ? -f : f) < 0 ? 1 : 0);
  }

  /** Recursively isolates the roots numbered base… in (a, b]; na, nb are N(a), N(b), fa, fb are F there. */
  private isolate(a: number, na: number, fa: number, b: number, nb: number, fb: number, base: number): void {
    const first = na - base;
    if (nb <= na || first >= this.wanted) return;
    if (nb - na === 1) {
      this.refine(a, fa, b, fb, first);
      return;
    }
    const mid = 0.5 * (a + b);
    if (b - a <= SEPARATION_RTOL * b * 4 || mid <= a || mid >= b) {
      // Several roots inside one floating-point gap: cannot be told apart.
      this.giveUp(first, nb - base, 'inseparable');
      return;
    }
    if (this.outcome.evaluations >= this.budget) {
      this.giveUp(first, nb - base, 'evaluation-limit');
      return;
    }
    const nm = this.count(mid);
    const fm = this.lastF;
    if (!Number.isFinite(fm) || nm < na || nm > nb) {
      // N(c) is non-decreasing in exact arithmetic: a count against that order is rounding garbage.
      this.giveUp(first, nb - base, 'unstable');
      return;
    }
    this.isolate(a, na, fa, mid, nm, fm, base);
    this.isolate(mid, nm, fm, b, nb, fb, base);
  }

  private refine(a: number, fa: number, b: number, fb: number, index: number): void {
    const o = this.outcome;
    if (!Number.isFinite(fa) || !Number.isFinite(fb)) {
      this.out[index] = NaN;
      if (o.status === 'converged') o.status = 'unstable';
      o.found++;
      return;
    }
    const r = brent(this.f, a, b, fa, fb);
    if (r.status === 'converged') {
      this.out[index] = r.x;
      const scale = (this.stack.muH * this.omega) / r.x;
      const rel = Math.abs(r.fx) / scale;
      if (rel > o.worstResidual) o.worstResidual = rel;
    } else {
      this.out[index] = NaN;
      if (o.status === 'converged') o.status = r.status;
    }
    o.found++;
  }
}

/** Outcome of a cutoff search. */
export interface CutoffOutcome {
  status: StackSolveStatus;
  /** Cutoff frequency, Hz (NaN unless converged). */
  frequency: number;
  /** Propagator evaluations used. */
  evaluations: number;
}

/**
 * Cutoff frequency (Hz) of mode n: the lowest ω at which mode n exists,
 * found as the root in ω of F(ω, c = β_H) = τ (γ_H = 0) that raises the
 * Sturm count N(β_H) from n to n + 1. N(β_H) never decreases with ω (Love
 * modes have U ≤ c, so c_n(ω) never rises back to β_H). Mode 0 has no
 * cutoff (0 Hz). Method: bracket by doubling from a WKB-style first guess,
 * bisection on the count to isolate, Brent on τ.
 */
export function loveStackCutoff(s: LoveStack, n: number): CutoffOutcome {
  if (n <= 0) return { status: 'converged', frequency: 0, evaluations: 0 };
  let evaluations = 0;
  const countAt = (w: number): number => {
    evaluations++;
    return loveModesBelow(s, w, s.vsH);
  };
  // First guess: ω ∫ √(1/β² − 1/β_H²) dz = nπ over the layers slower than β_H.
  let slowness = 0;
  for (let j = 0; j < s.count; j++) {
    const b = s.vs[j];
    if (b < s.vsH) slowness += s.thickness[j] * Math.sqrt((s.vsH - b) * (s.vsH + b)) / (b * s.vsH);
  }
  const guess = (n * Math.PI) / slowness;
  let lo = guess;
  let hi = guess;
  // Each search below is bounded: 200 halvings or doublings span far more
  // than the frequencies of any model in bounds; the bisection stops at the
  // floating-point spacing.
  let nlo = countAt(lo);
  for (let i = 0; nlo > n; i++) {
    if (i >= 200 || !(lo > 0)) return { status: 'bracket-lost', frequency: NaN, evaluations };
    lo *= 0.5;
    nlo = countAt(lo);
  }
  let nhi = nlo;
  for (let i = 0; nhi <= n; i++) {
    hi *= 2;
    if (i >= 200 || !Number.isFinite(hi)) return { status: 'bracket-lost', frequency: NaN, evaluations };
    nhi = countAt(hi);
  }
  if (lo === hi) lo = hi * 0.5;
  // Bisection on the count until exactly one cutoff lies in (lo, hi].
  while (!(nlo === n && nhi === n + 1)) {
    const mid = 0.5 * (lo + hi);
    if (hi - lo <= SEPARATION_RTOL * 4 * hi) return { status: 'inseparable', frequency: NaN, evaluations };
    const nm = countAt(mid);
    if (nm < nlo || nm > nhi) return { status: 'unstable', frequency: NaN, evaluations };
    if (nm <= n) {
      lo = mid;
      nlo = nm;
    } else {
      hi = mid;
      nhi = nm;
    }
  }
  const tau = (w: number): number => {
    evaluations++;
    return propagate(s, w, s.vsH, false);
  };
  const r = brent(tau, lo, hi);
  return {
    status: r.status,
    frequency: r.status === 'converged' ? r.x / (2 * Math.PI) : NaN,
    evaluations,
  };
}
