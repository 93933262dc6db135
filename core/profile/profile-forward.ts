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
 * pick's root of the previous model starts the next search (`guesses`).
 * A warm root is kept only when it is verified to be the pick's mode:
 * for Love waves by the Sturm count (exactly `mode` roots below the
 * bracket, exactly `mode + 1` below its top; love-stack.ts); for the
 * Rayleigh fundamental by a parity check (the secular function has the same
 * sign at the scan floor as just below the bracket, so no single root lies
 * below) and a move of at most WARM_MOVE. Otherwise the full solver runs.
 * The parity check cannot see two new roots appearing together below the
 * fundamental (an osculation); fits start from full solves, and the chain
 * moves in small steps, which keeps that rare.
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
  /** As phase, started from a guess (the root of a nearby model); verified, else the full solver. */
  phaseNear(omega: number, mode: number, guess: number): number;
}

/** Largest relative move of a warm root before the full solver is asked instead. */
export const WARM_MOVE = 0.05;
/**
 * Relative tolerance of a warm root: 1e-11, far below any pick's standard
 * deviation (a few per cent), and a few Brent steps cheaper than full
 * precision. The group velocity at such a root differs by about as much.
 */
const WARM_RTOL = 1e-11;
/** First half-width of the warm bracket, relative to the guess; it grows ×3 up to five times. */
const WARM_STEP = 2e-3;

/**
 * A bracket [a, b] around `guess` within [lo, hi] where f changes sign, by
 * widening; null when none is found. Writes fa, fb into `out`.
 */
function bracketNear(f: (c: number) => number, guess: number, lo: number, hi: number, out: { a: number; b: number; fa: number; fb: number }): boolean {
  let d = WARM_STEP * guess;
  for (let i = 0; i < 6; i++, d *= 3) {
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
    if (a === lo && b === hi) return false;
  }
  return false;
}

const bracket = { a: 0, b: 0, fa: 0, fb: 0 };

function loveNear(stack: LoveStack, omega: number, mode: number, guess: number): number {
  if (!(guess > stack.vsMin && guess < stack.vsH)) return NaN;
  const f = (c: number) => loveSecular(stack, omega, c);
  if (!bracketNear(f, guess, stack.vsMin * (1 + 1e-12), stack.vsH, bracket)) return NaN;
  // Sturm count: exactly `mode` roots below a, `mode + 1` below b.
  if (loveModesBelow(stack, omega, bracket.a) !== mode || loveModesBelow(stack, omega, bracket.b) !== mode + 1) return NaN;
  const r = brent(f, bracket.a, bracket.b, bracket.fa, bracket.fb, { rtol: WARM_RTOL });
  return r.status === 'converged' ? r.x : NaN;
}

export type WaveForwardFactory = (model: ForwardModel) => WaveForward;

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
    phaseNear(omega, mode, guess) {
      const c = loveNear(stack, omega, mode, guess);
      return Number.isNaN(c) || Math.abs(c - guess) > WARM_MOVE * guess ? phase(omega, mode) : c;
    },
  };
};

function rayleighNear(stack: RayleighStack, floor: number, omega: number, guess: number): number {
  if (!(guess > floor && guess < stack.vsH)) return NaN;
  const f = (c: number) => rayleighSecular(stack, omega, c);
  if (!bracketNear(f, guess, floor, stack.vsH, bracket)) return NaN;
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
 * velocity; warm starts for the fundamental mode only.
 */
export const RAYLEIGH_FORWARD: WaveForwardFactory = (model) => {
  const stack = prepareRayleighStack(model);
  const solver = new RayleighStackSolver(stack);
  const floor = rayleighSearchFloor(stack);
  let roots = new Float64Array(1);
  const phase = (omega: number, mode: number): number => {
    if (roots.length < mode + 1) roots = new Float64Array(mode + 1);
    const found = solver.solve(omega, mode + 1, roots);
    return found > mode ? roots[mode] : NaN;
  };
  return {
    phase,
    group(omega, _mode, c) {
      return rayleighStackGroupVelocity(stack, omega, c);
    },
    phaseNear(omega, mode, guess) {
      if (mode !== 0) return phase(omega, mode);
      const c = rayleighNear(stack, floor, omega, guess);
      return Number.isNaN(c) || Math.abs(c - guess) > WARM_MOVE * guess ? phase(omega, mode) : c;
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
}

const WAVES: readonly PickWave[] = ['love', 'rayleigh'];

/**
 * Writes each pick's predicted velocity (m/s) into `out`. With `guesses`
 * (one per pick; NaN = none), each pick's phase velocity is started from
 * its guess and the root found is written back (NaN where the mode is
 * absent). Throws an Error when picks of a wave have no engine (the
 * estimate checks this up front).
 */
export function predictPicks(picks: ForwardPicks, model: ForwardModel, out: Float64Array, guesses?: Float64Array): void {
  const vsH = model.halfspace.vs;
  for (let w = 0; w < WAVES.length; w++) {
    let engine: WaveForward | null = null;
    for (let i = 0; i < picks.n; i++) {
      if (picks.wave[i] !== w) continue;
      if (!engine) {
        const factory = WAVE_FORWARDS[WAVES[w]];
        if (!factory) throw new Error(`No ${WAVES[w]} forward solver is available.`);
        engine = factory(model);
      }
      const omega = picks.omega[i];
      const g = guesses ? guesses[i] : NaN;
      const c = Number.isNaN(g) ? engine.phase(omega, picks.mode[i]) : engine.phaseNear(omega, picks.mode[i], g);
      if (guesses) guesses[i] = c;
      if (Number.isNaN(c)) out[i] = vsH;
      else out[i] = picks.isPhase[i] ? c : engine.group(omega, picks.mode[i], c);
    }
  }
}
