/**
 * The forward step of the layered estimate: each pick's predicted velocity
 * (its own wave, kind and mode) from N layers over a half-space.
 *
 * Method, by wave type (one engine per wave, chosen by the pick's `wave`):
 *  - Love: the Thomson–Haskell SH propagator with Sturm-count root
 *    isolation (core/dispersion/love-stack.ts) and the energy-integral group
 *    velocity (core/dispersion/group-velocity.ts); Aki & Richards,
 *    *Quantitative Seismology*, 2nd ed. 2002, §7.2–7.3.
 *  - Rayleigh: the compound-matrix P-SV secular function (Dunkin 1965, BSSA
 *    55:335) with its root scan (core/dispersion/rayleigh-stack.ts) and
 *    the group velocity U = c − k·F_k/F_c, with the P speeds of p-speed.ts.
 *
 * Warm starts: inside a fit, successive models differ little, so each
 * pick's root of the previous model starts the next search (`guesses`),
 * (for Rayleigh waves only within RAYLEIGH_WARM_SPREAD), in a bracket
 * about as wide as the model moved (`spread`: a Jacobian
 * column of Levenberg–Marquardt moves the model by 1e-7, so its roots are
 * found in a bracket a few times that wide, not the 2e-3 of a fresh start).
 * Without a previous model, the picks of one wave and mode are taken from
 * the highest frequency down (`trackingOrder`): the first is solved in
 * full (at high frequency the fundamental lies close above the scan floor,
 * so the scan is shortest there), and each next one starts from its
 * neighbours' roots extrapolated in log ω (tracking along the dispersion
 * curve). A warm or tracked root is kept only when it is verified to be
 * the pick's mode:
 * for Love waves by the Sturm count (exactly `mode` roots below the
 * bracket, exactly `mode + 1` below its top; love-stack.ts); for the
 * Rayleigh fundamental by a parity check (the secular function has the same
 * sign at the scan floor as just below the bracket, so no single root lies
 * below) and a move of at most WARM_MOVE, and only in a model whose shear
 * and P speeds never decrease with depth, or from a model a Jacobian step
 * away (LOW_VELOCITY_WARM_WIDTH). Otherwise the full solver runs.
 * P-SV has no Sturm count, and a parity check cannot see a pair of roots
 * below: under a low-velocity layer a branch trapped in it can pass close
 * below the fundamental, and a small change of the model or frequency
 * turns that near miss into two roots (a seeded test found one at a 3 %
 * step), so such models are solved by the full scan whenever the result
 * counts (`screening` false).
 *
 * Screening (`screening` true; the search's samples and the steps of
 * Levenberg–Marquardt, profile-estimate.ts): a Rayleigh fundamental is
 * warm-started and tracked along frequency with the parity check in every
 * model, low-velocity layer or not, so it can miss such a pair below.
 * On 2,188 seeded random models with a low-velocity layer (2–4 layers, 40
 * picks 3–40 Hz) 3 % of the models differed from the full scan at one pick
 * or more, by up to 5 % in speed. A screened misfit only guides the search;
 * every misfit the estimate keeps (each refined fit, the ensemble, the
 * best fit's predictions) comes from a verified forward step.
 *
 * Tracking guesses for Rayleigh picks: the previous model's root at the
 * pick, scaled by how the roots at the previous two (higher) frequencies
 * moved (the log ratio extrapolated in log ω), in a first bracket a few
 * times as wide as the last such guess missed; then the straight-line
 * extrapolation in log ω. Either is accepted only by the checks above, so
 * the guess decides the cost, not the root.
 *
 * Below the cutoff of a pick's mode the mode does not exist; the prediction
 * is then the half-space shear speed, the value both velocities tend to at
 * the cutoff, which keeps the misfit continuous (as the one-layer estimate
 * does). Domain: SI units; the caller keeps the half-space faster than the
 * slowest layer. Accuracy: that of the solvers (about 1e-12 relative).
 */
import { loveStackGroupVelocity } from '../dispersion/group-velocity';
import { LoveStackSolver, loveModesBelow, loveSecular, prepareLoveStack, type LoveStack } from '../dispersion/love-stack';
import { brent } from '../numeric/roots';
import {
  prepareRayleighStack,
  rayleighSearchFloor,
  rayleighSecular,
  RayleighStackSolver,
  rayleighStackGroupVelocity,
  type RayleighStack,
} from '../dispersion/rayleigh-stack';
import type { PickWave } from '../picks/picks';
import type { ElasticLayer } from './p-speed';

/** A model as the forward step takes it: layers with P speeds, then the half-space. */
export interface ForwardModel {
  layers: readonly ElasticLayer[];
  halfspace: { vs: number; vp: number; density: number };
}

/** One wave type's solver for one model. */
export interface WaveForward {
  /** Phase velocity (m/s) of `mode` at ω (rad/s); NaN where the mode does not exist or did not converge. */
  phase(omega: number, mode: number): number;
  /** Group velocity (m/s) of `mode` at ω, whose phase velocity there is c. */
  group(omega: number, mode: number, c: number): number;
  /**
   * The phase velocity of `mode` at ω started from a guess (the root of a
   * nearby model, or of the neighbouring frequency), searched first within
   * ±width·guess (relative half-width, default WARM_STEP): NaN unless a
   * root within WARM_MOVE of the guess is found and verified to be the
   * mode (then ask `phase`). `moved` (default width) is how far, relative,
   * the root may have moved since it was verified (a guess from another
   * frequency: Infinity); the Rayleigh rule for a low-velocity layer reads it.
   */
  phaseNear(omega: number, mode: number, guess: number, width?: number, moved?: number): number;
}

/**
 * Work counters of the forward step since the process started (read by the
 * bench to report the cost of an estimate in models and solves, which a
 * busy machine does not blur as it does times).
 */
export const forwardWork = { models: 0, fullSolves: 0, warmSolves: 0, warmMisses: 0, screenedModels: 0 };

/** Largest relative move of a warm root before the full solver is asked instead. */
export const WARM_MOVE = 0.05;
/** Largest change of any log parameter (about 10 %) for which a Love root of the previous model starts the next solve. */
export const LOVE_WARM_SPREAD = 0.1;
/**
 * Largest change of a log parameter (3 %) for which a Rayleigh root of the
 * previous model starts the next solve. Measured on 400 seeded random
 * models without a low-velocity layer: moves of up to 3 % never led the
 * parity check astray, 5 % did once in 12,000 picks and 10 % 164 times
 * (dense overtones of a thick layer pass a pair of roots below the guess);
 * beyond it each pick is tracked along frequency instead.
 */
export const RAYLEIGH_WARM_SPREAD = 0.03;
/**
 * In a model with a low-velocity layer a Rayleigh root is warm-started
 * only from a model that differs by a Jacobian step (first bracket at most
 * ±2e-5 relative, i.e. a move of 1e-5): a pair of roots would have to be
 * born within that distance below the fundamental, where the misfit jumps
 * anyway.
 */
const LOW_VELOCITY_WARM_WIDTH = 2e-5;
/**
 * Relative tolerance of a warm root: 1e-11, far below any pick's standard
 * deviation (a few per cent), and a few Brent steps cheaper than full
 * precision. The group velocity at such a root differs by about as much.
 */
const WARM_RTOL = 1e-11;
/** Default first half-width of the warm bracket, relative to the guess; it grows ×3 until it exceeds WARM_MOVE. */
export const WARM_STEP = 2e-3;
/** Smallest first half-width (relative): well above the roots' own tolerance. */
const WARM_STEP_MIN = 1e-9;
/** A shaped tracking guess's first half-width: SHAPE_STEP_MARGIN times the last one's miss, at least SHAPE_STEP_MIN (relative). */
const SHAPE_STEP_MARGIN = 4;
const SHAPE_STEP_MIN = 1e-7;

/**
 * A bracket [a, b] around `guess` within [lo, hi] where f changes sign, by
 * widening from ±width·guess (×3 each time, the last try at least
 * ±WARM_MOVE·guess, since a root moved further is not kept); false when
 * none is found. Writes fa, fb into `out`.
 */
function bracketNear(
  f: (c: number) => number,
  guess: number,
  width: number,
  lo: number,
  hi: number,
  out: { a: number; b: number; fa: number; fb: number },
): boolean {
  let d = Math.min(WARM_MOVE, Math.max(WARM_STEP_MIN, width)) * guess;
  for (;;) {
    const a = Math.max(lo, guess - d);
    const b = Math.min(hi, guess + d);
    const fa = f(a);
    const fb = f(b);
    if (fa === 0 || fb === 0 || (fa < 0) !== (fb < 0)) {
      out.a = a;
      out.b = b;
      out.fa = fa;
      out.fb = fb;
      return true;
    }
    if ((a === lo && b === hi) || d >= WARM_MOVE * guess) return false;
    d *= 3;
  }
}

const bracket = { a: 0, b: 0, fa: 0, fb: 0 };

function loveNear(stack: LoveStack, omega: number, mode: number, guess: number, width: number): number {
  if (!(guess > stack.vsMin && guess < stack.vsH)) return NaN;
  const f = (c: number) => loveSecular(stack, omega, c);
  if (!bracketNear(f, guess, width, stack.vsMin * (1 + 1e-12), stack.vsH, bracket)) return NaN;
  // Sturm count: exactly `mode` roots below a, `mode + 1` below b.
  if (loveModesBelow(stack, omega, bracket.a) !== mode || loveModesBelow(stack, omega, bracket.b) !== mode + 1) return NaN;
  const r = brent(f, bracket.a, bracket.b, bracket.fa, bracket.fb, { rtol: WARM_RTOL });
  return r.status === 'converged' ? r.x : NaN;
}

export type WaveForwardFactory = (model: ForwardModel, screening?: boolean) => WaveForward;

/** Love waves: N-layer Thomson–Haskell (love-stack.ts) and energy-integral group velocity. */
export const LOVE_FORWARD: WaveForwardFactory = (model) => {
  const stack = prepareLoveStack(model);
  const solver = new LoveStackSolver(stack);
  let roots = new Float64Array(1);
  const phase = (omega: number, mode: number): number => {
    if (roots.length < mode + 1) roots = new Float64Array(mode + 1);
    const found = solver.solve(omega, mode + 1, roots);
    return found > mode ? roots[mode] : NaN;
  };
  return {
    phase,
    group(omega, _mode, c) {
      return loveStackGroupVelocity(stack, omega, c);
    },
    phaseNear(omega, mode, guess, width = WARM_STEP) {
      const c = loveNear(stack, omega, mode, guess, width);
      return Math.abs(c - guess) <= WARM_MOVE * guess ? c : NaN;
    },
  };
};

/** True when neither shear nor P speed decreases downwards, the half-space included (no low-velocity layer). */
function speedsNeverDecrease(model: ForwardModel): boolean {
  const L = model.layers;
  for (let j = 0; j < L.length; j++) {
    const below = j + 1 < L.length ? L[j + 1] : model.halfspace;
    if (below.vs < L[j].vs || below.vp < L[j].vp) return false;
  }
  return true;
}

function rayleighNear(stack: RayleighStack, floor: number, omega: number, guess: number, width: number): number {
  if (!(guess > floor && guess < stack.vsH)) return NaN;
  const f = (c: number) => rayleighSecular(stack, omega, c);
  if (!bracketNear(f, guess, width, floor, stack.vsH, bracket)) return NaN;
  // Parity: no single root between the scan floor and the bracket.
  if (bracket.a > floor) {
    const f0 = f(floor);
    if (f0 === 0 || (f0 < 0) !== (bracket.fa < 0)) return NaN;
  }
  const r = brent(f, bracket.a, bracket.b, bracket.fa, bracket.fb, { rtol: WARM_RTOL });
  return r.status === 'converged' ? r.x : NaN;
}

/**
 * Rayleigh waves: the compound-matrix secular function with its scan and
 * Brent refinement (core/dispersion/rayleigh-stack.ts) and its group
 * velocity; warm starts for the fundamental mode of a model without a
 * low-velocity layer only (header).
 */
export const RAYLEIGH_FORWARD: WaveForwardFactory = (model, screening = false) => {
  const stack = prepareRayleighStack(model);
  const floor = rayleighSearchFloor(stack);
  const warmable = screening || speedsNeverDecrease(model);
  // The scanning solver is built only when a pick needs a full solve (warm and tracked roots do not).
  let solver: RayleighStackSolver | null = null;
  let roots = new Float64Array(1);
  const phase = (omega: number, mode: number): number => {
    if (roots.length < mode + 1) roots = new Float64Array(mode + 1);
    solver ??= new RayleighStackSolver(stack);
    const found = solver.solve(omega, mode + 1, roots);
    return found > mode ? roots[mode] : NaN;
  };
  return {
    phase,
    group(omega, _mode, c) {
      return rayleighStackGroupVelocity(stack, omega, c);
    },
    phaseNear(omega, mode, guess, width = WARM_STEP, moved = width) {
      if (mode !== 0 || (!warmable && !(moved <= LOW_VELOCITY_WARM_WIDTH))) return NaN;
      const c = rayleighNear(stack, floor, omega, guess, width);
      return Math.abs(c - guess) <= WARM_MOVE * guess ? c : NaN;
    },
  };
};

/** The engines by wave type (null would mark a wave this build cannot solve). */
export const WAVE_FORWARDS: Readonly<Record<PickWave, WaveForwardFactory | null>> = {
  love: LOVE_FORWARD,
  rayleigh: RAYLEIGH_FORWARD,
};

/** The picks in columns, as the forward step reads them. */
export interface ForwardPicks {
  n: number;
  /** Angular frequency ω = 2πf, rad/s. */
  omega: Float64Array;
  mode: Int32Array;
  isPhase: Uint8Array;
  /** 0 = Love, 1 = Rayleigh. */
  wave: Uint8Array;
  /** The order in which the picks are solved (trackingOrder); computed when absent. */
  order?: Int32Array;
}

const WAVES: readonly PickWave[] = ['love', 'rayleigh'];

/** The pick indices by wave, then mode, then frequency from the highest down: the order in which roots are tracked. */
export function trackingOrder(picks: ForwardPicks): Int32Array {
  const idx = Array.from({ length: picks.n }, (_, i) => i);
  idx.sort((a, b) => picks.wave[a] - picks.wave[b] || picks.mode[a] - picks.mode[b] || picks.omega[b] - picks.omega[a] || a - b);
  return Int32Array.from(idx);
}

/**
 * Writes each pick's predicted velocity (m/s) into `out`. With `guesses`
 * (one per pick; NaN = none), each pick's phase velocity is started from
 * its guess, in a bracket of relative half-width about `spread` (the
 * largest change of a log parameter since the model that gave the
 * guesses; a guess is used directly only while `spread` is at most
 * LOVE_WARM_SPREAD or RAYLEIGH_WARM_SPREAD for the pick's wave), and the
 * root found is written back (NaN where the mode is absent). A pick
 * without a usable guess is started from the roots of its wave and mode at
 * the next higher frequencies (header), the first in full. `screening`
 * (header) only for models whose misfit guides a search. Throws an Error when picks of a wave have no engine (the estimate checks
 * this up front).
 */
export function predictPicks(picks: ForwardPicks, model: ForwardModel, out: Float64Array, guesses?: Float64Array, spread = WARM_STEP, screening = false): void {
  forwardWork.models++;
  if (screening) forwardWork.screenedModels++;
  const vsH = model.halfspace.vs;
  const order = picks.order ?? trackingOrder(picks);
  const width = Math.min(WARM_STEP, Math.max(WARM_STEP_MIN, 2 * spread));
  const engines: Array<WaveForward | null> = [null, null];
  let lastWave = -1;
  let lastMode = -1;
  // The last two roots along the curve being tracked (ω, c), ω falling.
  let o1 = NaN;
  let c1 = NaN;
  let o2 = NaN;
  let c2 = NaN;
  // The previous model's root at the last pick tracked (NaN if none).
  let p1 = NaN;
  let p2 = NaN;
  // The first half-width for the next shaped guess.
  let shapeWidth = WARM_STEP;
  for (let r = 0; r < order.length; r++) {
    const i = order[r];
    const w = picks.wave[i];
    const mode = picks.mode[i];
    if (w !== lastWave || mode !== lastMode) {
      lastWave = w;
      lastMode = mode;
      o1 = c1 = o2 = c2 = p1 = p2 = NaN;
      shapeWidth = WARM_STEP;
    }
    let engine = engines[w];
    if (!engine) {
      const factory = WAVE_FORWARDS[WAVES[w]];
      if (!factory) throw new Error(`No ${WAVES[w]} forward solver is available.`);
      engine = engines[w] = factory(model, screening);
    }
    const omega = picks.omega[i];
    // (The first Love pick of a curve takes its guess at any move: the Sturm count verifies it, and else it is solved in full.)
    const g = guesses && (spread <= (w === 0 ? LOVE_WARM_SPREAD : RAYLEIGH_WARM_SPREAD) || (w === 0 && Number.isNaN(c1))) ? guesses[i] : NaN;
    // The nearby model's root, else the curve tracked from the higher frequencies, else the full solver.
    const old = guesses ? guesses[i] : NaN;
    let c = Number.isNaN(g) ? NaN : near(engine, omega, mode, g, width);
    if (Number.isNaN(c) && !Number.isNaN(c1)) {
      // The previous model's curve scaled to pass through this model's root at the previous pick
      // (Rayleigh only: for Love waves it made more Sturm-count misses than the extrapolation).
      let shaped = w === 0 ? NaN : old * (c1 / p1);
      if (!Number.isNaN(c2) && !Number.isNaN(p2) && o2 !== o1) {
        // The log ratio of the two models' roots, extrapolated in log ω from the two previous picks.
        const r1 = Math.log(c1 / p1);
        const r2 = Math.log(c2 / p2);
        shaped = old * Math.exp(r1 + ((r1 - r2) * Math.log(omega / o1)) / Math.log(o1 / o2));
      }
      if (Number.isFinite(shaped)) {
        c = near(engine, omega, mode, shaped, shapeWidth, Infinity);
        shapeWidth = Number.isNaN(c) ? WARM_STEP : Math.min(WARM_STEP, Math.max(SHAPE_STEP_MIN, SHAPE_STEP_MARGIN * Math.abs(c / shaped - 1)));
      }
      if (Number.isNaN(c)) {
        // Straight-line extrapolation of ln c against ln ω from the two previous roots.
        let guess = c1;
        if (!Number.isNaN(c2) && o2 !== o1 && omega !== o1) {
          guess = c1 * Math.exp((Math.log(c1 / c2) * Math.log(omega / o1)) / Math.log(o1 / o2));
        }
        if (!(Math.abs(guess - shaped) <= WARM_STEP * guess)) c = near(engine, omega, mode, guess, WARM_STEP, Infinity);
      }
    }
    if (Number.isNaN(c)) {
      forwardWork.fullSolves++;
      c = engine.phase(omega, mode);
    }
    if (guesses) guesses[i] = c;
    if (Number.isNaN(c)) {
      o1 = c1 = o2 = c2 = p1 = p2 = NaN;
      out[i] = vsH;
    } else {
      o2 = o1;
      c2 = c1;
      o1 = omega;
      c1 = c;
      p2 = p1;
      p1 = old;
      out[i] = picks.isPhase[i] ? c : engine.group(omega, mode, c);
    }
  }
}

function near(engine: WaveForward, omega: number, mode: number, guess: number, width: number, moved = width): number {
  forwardWork.warmSolves++;
  const c = engine.phaseNear(omega, mode, guess, width, moved);
  if (Number.isNaN(c)) forwardWork.warmMisses++;
  return c;
}
