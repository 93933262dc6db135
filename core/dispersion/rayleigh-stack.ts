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
 *    from advancing by more than π/8 (the minors are products of two
 *    solutions, so F can turn with up to twice these phases), and
 *    never exceeds 4 % of c (for the roots that no phase drives, such as
 *    the fundamental in the evanescent range or interface waves), nor 0.05
 *    in r_β = √(1 − c²/β_H²) (F is analytic in r_β, not in c, near β_H,
 *    where the overtones start);
 *  - where |F| (only smooth positive factors taken out, so its size is
 *    meaningful) has a local minimum between two grid points of one sign
 *    (the cell's ends lower than the grid points beyond them, or an end a
 *    dip; a root in the cell beyond such a grid point pulls |F| down there
 *    and can hide a pair's valley, so those values are also compared with
 *    that root's factor (c − r) divided out, the root refined first),
 *    and the exact slopes d ln|F|/dc along the scan at the two ends (rayleighSecularSlope,
 *    forward differentiation) confirm a valley, |F| falling into the cell
 *    from both ends (two hidden roots need that, unless F also turns at an
 *    extremum within the same cell: three roots or extrema crowded into
 *    π/8 of vertical phase), the minimum is searched (Brent's minimiser); if F changes sign there, the
 *    two close roots of an osculation (two branches that nearly touch, e.g.
 *    a mode of a buried low-velocity layer meeting one of the crust) are
 *    both reported; if it does not, the outcome notes the close approach;
 *    Beside a root r the slope on that side says little: |F| falls
 *    towards r anyway and may turn between r and a pair. So by default
 *    (`careful`) such a cell is judged by its far side first, and a cell
 *    that passes is searched unless a second test rules the pair out: the
 *    root of the next cell is refined first, the factor (c − r) of each
 *    neighbouring root is divided out of F̃ (d ln|F̃/(c − r)|/dc =
 *    d ln|F̃|/dc − 1/(c − r)), and where the two slopes of what is left,
 *    times the cell's width w, are both small (the rest is flat over the
 *    cell) a pair r₁, r₂ would still make them rise by at least 4 across
 *    it (1/(c − r₁) + 1/(c − r₂) goes from below −2/w to above 2/w); a
 *    rise below 2 rules it out (PAIR_RISE, PAIR_FLAT, NEAR_ROOT_CELLS;
 *    no root lost against searching every such cell on 105,000 seeded
 *    random solves of every mode, and rayleigh-close-pairs.test.ts). The
 *    slopes are those of the function the scan samples, F̃(c, ω/c), at
 *    fixed ω (rayleighSecularSlope); taken at fixed k instead, as before,
 *    they missed real pairs in 7 of those solves. The
 *    fast mode (careful = false) uses both plain slopes always, a
 *    coarser grid (π/5 of phase, 6 % of c) and the plain walls only, and can miss a close pair
 *    within two cells of a third root: curves use it and check each
 *    frequency against its neighbours (curve.ts followModes);
 *  - each sign change is refined by Brent's method (core/numeric/roots.ts).
 *
 * The scan starts at c_floor = 0.9 × the slowest Rayleigh speed of any
 * layer or the half-space, below which the modes of a layered half-space
 * are not expected (the slowest possible guided wave is the Rayleigh wave
 * of the slowest solid); test/unit/core/dispersion/rayleigh-random.test.ts
 * scans from 0.3·β_min on seeded random models to check this. F is also
 * evaluated one grid step below the floor, so that the first cell has a
 * neighbour below like any other (a root found there is reported).
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
 * (model.ts checkRayleighModel). Accuracy: roots to about 4e-14 relative
 * (Brent's tolerance, ROOT_RTOL) where F is well conditioned; a layer much
 * stiffer than c (β/c ≈ 10) loses digits in the (β/c)⁴ terms of the layer
 * step, down to about 1e-8 relative. Group velocity to about 1e-9
 * relative, less beside such roots.
 */
import { brent, type RootStatus } from '../numeric/roots';
import {
  rayleighSecular,
  rayleighSecularDerivatives,
  rayleighSecularSlope,
  secularScale,
  secularSlope,
  type RayleighStack,
  type SecularDerivatives,
} from './rayleigh-secular';

const slopeScratch: SecularDerivatives = { value: 0, dc: 0, dk: 0 };

// The scan's inner calls through plain module constants: under a CommonJS transform (tsx, which runs the
// benches and the office command line from source) every use of an imported binding is a property getter.
const secular = rayleighSecular;
const secularWithSlope = rayleighSecularSlope;
const scaleOfValue = secularScale;
const scaleOfSlope = secularSlope;

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

/** Largest advance of the vertical phase Φ between grid points, rad (F, built of minors, can turn with up to 2Φ). */
const PHASE_STEP = Math.PI / 8;
/** The same in the fast mode (careful = false), whose misses curves catch by their neighbour check. */
const FAST_PHASE_STEP = Math.PI / 5;
/** Largest step of r_β = √(1 − c²/β_H²) of the half-space between grid points. */
const HALFSPACE_STEP = 0.05;
/** Largest relative step in c between grid points. */
const RELATIVE_STEP = 0.04;
/** The same in the fast mode. */
const FAST_RELATIVE_STEP = 0.06;
/**
 * Careful mode, a cell beside a root that its far side lets pass (valley):
 * a pair is ruled out where the slopes of ln|F̃/(c − r)| times the cell's
 * width rise by less than PAIR_RISE across it and neither exceeds
 * PAIR_FLAT in size. A pair makes the rise at least 4 where the rest of F
 * is flat over the cell. Over 60,000 seeded random solves (every mode;
 * models as in rayleigh-random.test.ts, half with a very soft layer at
 * depth; mulberry32 seeds 1–4; slopes then at fixed k), the 64 pairs that
 * the far-side test let through had a rise of 7.8 or more, a slope of 17
 * or more in size, or a root within 0.05 cells; about three quarters of
 * the other cells it let through (no pair) are ruled out.
 */
const PAIR_RISE = 2;
/** The largest |slope|·width at either end of a cell that still counts as flat (see PAIR_RISE). */
const PAIR_FLAT = 4;
/** … unless a neighbouring root lies within this fraction of the cell's width of its end. */
const NEAR_ROOT_CELLS = 0.1;
/** Two roots closer than this (relative) are reported as a close approach of two branches. */
export const CLOSE_ROOTS_RTOL = 1e-3;
/** Iterations of the minimiser when probing a local minimum of |F|. */
const PROBE_ITERATIONS = 40;
/** Relative resolution of that probe: two roots closer than this are not told apart. */
const PROBE_RTOL = 1e-10;
/** Brent's relative tolerance for the roots (about 100 units of rounding; F is not better conditioned). */
const ROOT_RTOL = 2e-14;
const ROOT_OPTIONS = { rtol: ROOT_RTOL };

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
  /** Evaluations of the secular function used (value or value with slope). */
  evaluations: number;
  /** Of these, evaluations with the slope ∂F/∂c (about twice the cost of a value). */
  slopeEvaluations: number;
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
    evaluations: 0,
    slopeEvaluations: 0,
    close: [],
  };
  /**
   * True (the default): beside a root, a cell is judged by the slope on its
   * far side only, since |F̃| may turn between that root and a hidden pair.
   * False: by both slopes always, on a coarser grid, about a third of the
   * work for a curve, but a
   * close pair within two cells of a third root can then be missed; curves
   * (curve.ts) run this way and check each frequency's roots against the
   * neighbouring frequencies', solving again with care where they disagree.
   */
  careful = true;
  private omega = 0;
  private readonly slopeAt = new Float64Array([NaN, NaN]);
  private readonly slopeVal = new Float64Array(2);
  private slopeNext = 0;
  /** A root refined ahead of its cell's turn (solve), and the lower end of that cell (NaN: none). */
  private ahead: { x: number; status: RootStatus } = { x: NaN, status: 'converged' };
  private aheadAt = NaN;
  private readonly f = (c: number): number => {
    this.outcome.evaluations++;
    return secular(this.stack, this.omega, c);
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

  /** Φ at the point the last nextPoint returned. */
  private nextPhase = 0;

  /** Next grid point after c (at most `top`); its Φ into nextPhase. */
  private nextPoint(c: number, phi: number, top: number): number {
    // F is analytic in r = √(1 − c²/β_H²), not in c, near β_H: step at most HALFSPACE_STEP in r there.
    const r = Math.sqrt(Math.max(0, 1 - (c * c) / (top * top)));
    const rNext = r - HALFSPACE_STEP;
    const cap = rNext > 0 ? top * Math.sqrt(1 - rNext * rNext) : top;
    let dc = Math.min((this.careful ? RELATIVE_STEP : FAST_RELATIVE_STEP) * c, cap - c);
    const step = this.careful ? PHASE_STEP : FAST_PHASE_STEP;
    for (let i = 0; i < 30; i++) {
      const c1 = Math.min(c + dc, top);
      const phi1 = this.phase(c1);
      const dphi = phi1 - phi;
      if (dphi <= step) {
        this.nextPhase = phi1;
        return c1;
      }
      dc *= Math.max(0.1, (0.9 * step) / dphi);
    }
    const c1 = Math.min(c + dc, top);
    this.nextPhase = this.phase(c1);
    return c1;
  }

  /**
   * Writes c_0 < c_1 < … (m/s) for the lowest min(modes, present) modes at
   * ω (rad/s) into out[0…]; returns how many were written. Check
   * `outcome.status`: a root that did not converge is written as NaN.
   * With `start` (m/s), the scan begins there instead of at the floor, and
   * only roots above it are found and numbered from 0: for a caller that
   * knows there is none below (curve.ts followModes).
   */
  solve(omega: number, modes: number, out: Float64Array, start?: number): number {
    const o = this.outcome;
    o.status = 'converged';
    o.found = 0;
    o.complete = false;
    o.evaluations = 0;
    o.slopeEvaluations = 0;
    o.close = [];
    this.slopeAt.fill(NaN);
    if (!(omega > 0) || modes <= 0 || !(this.floor > 0)) return 0;
    this.omega = omega;
    const top = this.stack.vsH;
    const fromFloor = !(start !== undefined && start > this.floor && start < this.stack.vsH);
    let c0 = fromFloor ? this.floor : (start as number);
    // From the floor, one grid step below it too, so that the first cell is judged like any other (with a
    // neighbour below, not as walled in by the unknown); a root there is reported too.
    const cBehind = c0 / (1 + (this.careful ? RELATIVE_STEP : FAST_RELATIVE_STEP));
    const fBehind = fromFloor ? this.f(cBehind) : NaN;
    let gPrev = fromFloor ? magnitude(fBehind) : NaN;
    let f0 = this.f(c0);
    let g0 = magnitude(f0);
    let c1 = this.nextPoint(c0, this.phase(c0), top);
    let phi1 = this.nextPhase;
    let f1 = this.f(c1);
    let g1 = magnitude(f1);
    let changePrev = false;
    // The root of the cell just left (NaN if none), and a root refined ahead of its turn: that of the next
    // cell, found before the cell beside it is judged (careful mode), kept until its own cell comes.
    let rootPrev = NaN;
    this.aheadAt = NaN;
    // The grid point below c0 and the root of the cell below that one (NaN: none), for the wall beyond a
    // cell's neighbour; and a grid point evaluated ahead of its turn (the one after c2; NaN: none).
    let cPrev = fromFloor ? cBehind : NaN;
    let rootPrev2 = NaN;
    let cLater = NaN;
    let fLater = NaN;
    let gLater = NaN;
    let phiLater = NaN;
    if (fromFloor && (f0 === 0 || fBehind * f0 < 0)) {
      const r = this.root(cBehind, fBehind, c0, f0);
      this.emit(r.x, r.status, modes, out);
      rootPrev = r.x;
      changePrev = true;
    }
    // Each cell (c0, c1) is settled with its neighbours' values at hand (one grid point of look-ahead).
    while (o.found < modes) {
      if (c0 >= top) {
        o.complete = true;
        break;
      }
      let c2 = NaN;
      let f2 = NaN;
      let g2 = NaN;
      let phi2 = NaN;
      const change = f1 === 0 || f0 * f1 < 0;
      // The look-ahead is not needed when this cell's root is the last one asked for.
      if (c1 < top && !(change && o.found + 1 >= modes)) {
        if (cLater === cLater) {
          c2 = cLater;
          phi2 = phiLater;
          f2 = fLater;
          g2 = gLater;
        } else {
          c2 = this.nextPoint(c1, phi1, top);
          phi2 = this.nextPhase;
          f2 = this.f(c2);
          g2 = magnitude(f2);
        }
      }
      cLater = NaN;
      const rootLeftCell = rootPrev;
      if (change) {
        const r = c0 === this.aheadAt ? this.ahead : this.root(c0, f0, c1, f1);
        this.emit(r.x, r.status, modes, out);
        rootPrev = r.x;
      } else if (f0 !== 0) {
        // Two close roots pull |F| down towards the cell from both sides: search a cell whose |F| is
        // lower at each end than beyond it (a root next door counts as lower beyond), or whose end is a
        // dip of |F|. The last cell has no right neighbour: it counts as walled.
        const changeNext = c1 < top && (f2 === 0 || f1 * f2 < 0);
        // A root in the cell beyond a neighbour pulls |F| down at the neighbour's far end, the point a wall is
        // judged against, and can hide the wall (a root just below cPrev, or just above c2): there the careful
        // scan also judges the wall with that root's factor (c − r) divided out of both values compared (the
        // fast scan does not: on 3,000 seeded solves it found no root more, for 5 % more evaluations).
        const careful = this.careful;
        let lowLeft = g0 < gPrev;
        if (careful && !lowLeft && !changePrev && rootPrev2 === rootPrev2) {
          lowLeft = g0 - Math.log2(c0 - rootPrev2) < gPrev - Math.log2(cPrev - rootPrev2);
        }
        const leftWall = Number.isNaN(gPrev) || lowLeft || changePrev;
        const rightWall = c1 >= top || g1 < g2 || changeNext;
        const dipLeft = lowLeft && g0 <= g1;
        const dipRight = c1 < top && g1 < g0 && g1 <= g2;
        let search = (leftWall && rightWall) || dipLeft || dipRight;
        let wallBeyond = false;
        if (careful && !search && !changeNext && c2 < top && (leftWall || g1 < g0)) {
          // Only the right end's comparison with c2 failed: look one grid point beyond c2 (needed later anyway
          // unless the scan stops first), and where that cell holds a root, refine it (kept for its turn) and
          // compare with its factor divided out.
          cLater = this.nextPoint(c2, phi2, top);
          phiLater = this.nextPhase;
          fLater = this.f(cLater);
          gLater = magnitude(fLater);
          if (fLater === 0 || f2 * fLater < 0) {
            this.ahead = this.root(c2, f2, cLater, fLater);
            this.aheadAt = c2;
            const r = this.ahead.x;
            search = wallBeyond = g1 - Math.log2(r - c1) < g2 - Math.log2(r - c2);
          }
        }
        if (search) {
          let rootNext = NaN;
          if (changeNext && careful) {
            // The next cell's root, found now so that the judgement of this cell can take it out.
            if (this.aheadAt !== c1) {
              this.ahead = this.root(c1, f1, c2, f2);
              this.aheadAt = c1;
            }
            rootNext = this.ahead.x;
          }
          if (this.valley(c0, c1, top, changePrev, changeNext, rootPrev, rootNext, wallBeyond)) this.probe(c0, f0, c1, f1, out, modes);
        }
      }
      if (!change) rootPrev = NaN;
      rootPrev2 = rootLeftCell;
      cPrev = c0;
      gPrev = g0;
      changePrev = change;
      c0 = c1;
      f0 = f1;
      g0 = g1;
      c1 = c2;
      f1 = f2;
      g1 = g2;
      phi1 = phi2;
    }
    // Close pairs among the roots found.
    for (let i = 0; i + 1 < o.found; i++) {
      const gap = out[i + 1] - out[i];
      if (gap <= CLOSE_ROOTS_RTOL * out[i + 1]) o.close.push({ mode: i, c: 0.5 * (out[i] + out[i + 1]), gap });
    }
    return o.found;
  }

  /** d ln|F̃|/dc at c (F̃ the scaled secular function), cached for the last two points asked. */
  private logSlope(c: number): number {
    if (c === this.slopeAt[0]) return this.slopeVal[0];
    if (c === this.slopeAt[1]) return this.slopeVal[1];
    this.outcome.evaluations++;
    this.outcome.slopeEvaluations++;
    const d = secularWithSlope(this.stack, this.omega, c, slopeScratch);
    const v = d.dc / d.value + scaleOfSlope.scale;
    const i = this.slopeNext;
    this.slopeAt[i] = c;
    this.slopeVal[i] = v;
    this.slopeNext = 1 - i;
    return v;
  }

  /**
   * False when the cell (ca, cb), whose ends share a sign, cannot be the
   * valley that two hidden roots make: |F̃| rises from its left end into
   * it (d ln|F̃|/dc ≥ 0 at ca) or falls from its right end into it
   * (≤ 0 at cb). Two roots r₁ < r₂ inside need |F̃| to fall from ca to
   * r₁ and rise from r₂ to cb; with the slopes the other way, F must also
   * turn at an extremum between an end and the pair, i.e. three roots or
   * extrema within one cell of π/8 vertical phase (header). Where the cell
   * holds a layer's α or β, the scale factor e^{−√a L} of that wave has a
   * square-root kink: it is taken back out (below). True (probe) for the
   * cell that ends at β_H, where F is analytic in r_β, not in c. A NaN
   * slope counts as a valley.
   */
  private valley(
    ca: number,
    cb: number,
    top: number,
    rootLeft: boolean,
    rootRight: boolean,
    rPrev: number,
    rNext: number,
    rightFirst: boolean,
  ): boolean {
    if (cb >= top) return true;
    if (!(this.careful && (rootLeft || rootRight))) {
      // Both slopes (fast mode, or careful with no root beside). Beside a root on the right, or one cell
      // beyond (rightFirst), |F̃| most often falls into cb: look there first (the next cell reuses it).
      const first = rootRight || rightFirst;
      if (first && this.logSlope(cb) <= 0) return false;
      if (this.leftSlope(ca, cb) >= 0) return false;
      return first || !(this.logSlope(cb) <= 0);
    }
    // Careful, beside a root: the slope on the root's side says nothing, so the far side judges first.
    let left = NaN;
    if (!rootLeft) {
      left = this.leftSlope(ca, cb);
      if (left >= 0) return false;
    }
    if (!rootRight && this.logSlope(cb) <= 0) return false;
    // The far side allows a pair. Divide the factors (c − r) of the neighbouring roots out of F̃, leaving
    // G̃ = F̃/Π(c − r), and read the slopes S_a, S_b of ln|G̃| at both ends (w = cb − ca). A pair r₁ < r₂ in
    // the cell adds 1/(c − r₁) + 1/(c − r₂) to them, below −2/w at ca and above 2/w at cb: where the rest of
    // G̃ is flat over the cell, the slopes rise by at least 4/w across it. The pair is ruled out only where
    // they rise by less than PAIR_RISE/w and both are flat (|S|·w ≤ PAIR_FLAT: steeper, more roots or near
    // misses crowd the cell, and the rest of G̃ may turn within it), and no root lies within
    // NEAR_ROOT_CELLS·w of the cell (its own pull then dwarfs a pair's).
    const w = cb - ca;
    if ((rootLeft && ca - rPrev < NEAR_ROOT_CELLS * w) || (rootRight && rNext - cb < NEAR_ROOT_CELLS * w)) return true;
    let dLeft = 0;
    let dRight = 0;
    if (rootLeft) {
      dLeft += 1 / (ca - rPrev);
      dRight += 1 / (cb - rPrev);
    }
    if (rootRight) {
      dLeft += 1 / (ca - rNext);
      dRight += 1 / (cb - rNext);
    }
    if (Number.isNaN(left)) left = this.leftSlope(ca, cb);
    const sa = (left - dLeft) * w;
    const sb = (this.logSlope(cb) - dRight) * w;
    return !(sb - sa < PAIR_RISE && Math.abs(sa) <= PAIR_FLAT && Math.abs(sb) <= PAIR_FLAT);
  }

  /** d ln|F̃|/dc at ca, with the factor e^{−√a L} of each wave whose speed lies in (ca, cb] taken back out. */
  private leftSlope(ca: number, cb: number): number {
    const s = this.stack;
    let left = this.logSlope(ca);
    // A wave whose speed v lies in (ca, cb] has its factor e^{−√a L} taken back out at ca: the
    // function judged, F̃·e^{√a L}, is then analytic over the cell (and its slope at ca only lower).
    for (let j = 0; j < s.count; j++) {
      const L = (this.omega / ca) * s.thickness[j];
      const xj = (ca * ca) / (s.vs[j] * s.vs[j]);
      if (s.vs[j] > ca && s.vs[j] <= cb) left -= ((xj / Math.sqrt(1 - xj) + Math.sqrt(1 - xj)) * L) / ca;
      const pj = s.p[j];
      if (s.vp[j] > ca && s.vp[j] <= cb) left -= (((pj * xj) / Math.sqrt(1 - pj * xj) + Math.sqrt(1 - pj * xj)) * L) / ca;
    }
    return left;
  }

  /**
   * The cell (ca, cb), whose ends have one sign, may hide two close roots:
   * search the minimum of |F| there by Brent's minimiser (parabolic steps
   * with golden-section fallback; Brent 1973, *Algorithms for Minimization
   * without Derivatives*, ch. 5) on log₂|F|, stopping as soon as F turns
   * over: then the two roots lie on either side. Returns true if it found
   * them.
   */
  private probe(ca: number, fa: number, cb: number, fb: number, out: Float64Array, modes: number): boolean {
    const sg = fa > 0 ? 1 : -1;
    const g = 0.3819660112501051;
    let a = ca;
    let b = cb;
    let x = ca + g * (cb - ca);
    let Fx = this.f(x);
    if (sg * Fx <= 0) return this.pair(ca, fa, x, Fx, cb, fb, out, modes);
    let fx = magnitude(Fx);
    let w = x;
    let v = x;
    let fw = fx;
    let fv = fx;
    let d = 0;
    let e = 0;
    for (let i = 0; i < PROBE_ITERATIONS; i++) {
      const m = 0.5 * (a + b);
      const tol = PROBE_RTOL * Math.abs(x);
      if (Math.abs(x - m) <= 2 * tol - 0.5 * (b - a)) break;
      let useGolden = true;
      if (Math.abs(e) > tol) {
        // Parabola through (v, fv), (w, fw), (x, fx).
        const r = (x - w) * (fx - fv);
        let q = (x - v) * (fx - fw);
        let p = (x - v) * q - (x - w) * r;
        q = 2 * (q - r);
        if (q > 0) p = -p;
        else q = -q;
        if (Math.abs(p) < Math.abs(0.5 * q * e) && p > q * (a - x) && p < q * (b - x)) {
          e = d;
          d = p / q;
          const u = x + d;
          if (u - a < 2 * tol || b - u < 2 * tol) d = x < m ? tol : -tol;
          useGolden = false;
        }
      }
      if (useGolden) {
        e = x < m ? b - x : a - x;
        d = g * e;
      }
      const u = Math.abs(d) >= tol ? x + d : x + (d > 0 ? tol : -tol);
      const Fu = this.f(u);
      if (sg * Fu <= 0) return this.pair(ca, fa, u, Fu, cb, fb, out, modes);
      const fu = magnitude(Fu);
      // A plain minimum of |F|: the bracket is small and log₂|F| has stopped falling (a hidden pair makes
      // log₂|F| fall without bound as the search closes in).
      if (b - a < 1e-4 * (cb - ca) && fu > fx - 1e-3) break;
      if (fu <= fx) {
        if (u < x) b = x;
        else a = x;
        v = w;
        fv = fw;
        w = x;
        fw = fx;
        x = u;
        fx = fu;
      } else {
        if (u < x) a = u;
        else b = u;
        if (fu <= fw || w === x) {
          v = w;
          fv = fw;
          w = u;
          fw = fu;
        } else if (fu <= fv || v === x || v === w) {
          v = u;
          fv = fu;
        }
      }
    }
    // No sign change: a near miss (tangency within rounding, or two branches passing close).
    if (fx <= Math.min(magnitude(fa), magnitude(fb)) - 30 && x - ca > PROBE_RTOL * x && cb - x > PROBE_RTOL * x) {
      this.outcome.close.push({ mode: -1, c: x, gap: 0 });
    }
    return false;
  }

  /** The two roots of a cell whose ends share a sign and whose interior point u has the other sign (or is a root). */
  private pair(ca: number, fa: number, u: number, fu: number, cb: number, fb: number, out: Float64Array, modes: number): boolean {
    this.refine(ca, fa, u, fu, out, modes);
    if (fu !== 0) this.refine(u, fu, cb, fb, out, modes);
    return true;
  }

  /** The root of a cell with a sign change (Brent), not yet written. */
  private root(a: number, fa: number, b: number, fb: number): { x: number; status: RootStatus } {
    const r = brent(this.f, a, b, fa, fb, ROOT_OPTIONS);
    return { x: r.x, status: r.status };
  }

  /** Writes the next root (NaN with the status when it did not converge). */
  private emit(x: number, status: RootStatus, modes: number, out: Float64Array): void {
    const o = this.outcome;
    if (o.found >= modes) return;
    if (status === 'converged') out[o.found] = x;
    else {
      out[o.found] = NaN;
      if (o.status === 'converged') o.status = status;
    }
    o.found++;
  }

  private refine(a: number, fa: number, b: number, fb: number, out: Float64Array, modes: number): void {
    const r = this.root(a, fa, b, fb);
    this.emit(r.x, r.status, modes, out);
  }
}

/** log₂|F| of the value just computed, with its power-of-two scale (comparable across c). */
function magnitude(f: number): number {
  return Math.log2(Math.abs(f)) + scaleOfValue.exponent;
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
