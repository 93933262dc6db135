/**
 * The forward step of the layered estimate: each pick's predicted velocity
 * (its own wave, kind and mode) from N layers over a half-space.
 *
 * Method, by wave type (one engine per wave, chosen by the pick's `wave`):
 *  - Love: the Thomson–Haskell SH propagator with Sturm-count root
 *    isolation (core/dispersion/love-stack.ts) and the energy-integral group
 *    velocity (core/dispersion/group-velocity.ts); Aki & Richards,
 *    *Quantitative Seismology*, 2nd ed. 2002, §7.2–7.3.
 *  - Rayleigh: the P-SV solver of core/dispersion (see RAYLEIGH_FORWARD),
 *    with the P speeds of p-speed.ts.
 *
 * Below the cutoff of a pick's mode the mode does not exist; the prediction
 * is then the half-space shear speed, the value both velocities tend to at
 * the cutoff, which keeps the misfit continuous (as the one-layer estimate
 * does). Domain: SI units; the caller keeps the half-space faster than the
 * slowest layer. Accuracy: that of the solvers (about 1e-12 relative).
 */
import { loveStackGroupVelocity } from '../dispersion/group-velocity';
import { LoveStackSolver, prepareLoveStack } from '../dispersion/love-stack';
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
}

export type WaveForwardFactory = (model: ForwardModel) => WaveForward;

/** Love waves: N-layer Thomson–Haskell (love-stack.ts) and energy-integral group velocity. */
export const LOVE_FORWARD: WaveForwardFactory = (model) => {
  const stack = prepareLoveStack(model);
  const solver = new LoveStackSolver(stack);
  let roots = new Float64Array(1);
  return {
    phase(omega, mode) {
      if (roots.length < mode + 1) roots = new Float64Array(mode + 1);
      const found = solver.solve(omega, mode + 1, roots);
      return found > mode ? roots[mode] : NaN;
    },
    group(omega, _mode, c) {
      return loveStackGroupVelocity(stack, omega, c);
    },
  };
};

/** The engines by wave type; null where this build has no solver for the wave. */
export const WAVE_FORWARDS: Readonly<Record<PickWave, WaveForwardFactory | null>> = {
  love: LOVE_FORWARD,
  rayleigh: null,
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
 * Writes each pick's predicted velocity (m/s) into `out`. Throws an Error
 * when picks of a wave have no engine (the estimate checks this up front).
 */
export function predictPicks(picks: ForwardPicks, model: ForwardModel, out: Float64Array): void {
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
      const c = engine.phase(omega, picks.mode[i]);
      if (Number.isNaN(c)) out[i] = vsH;
      else out[i] = picks.isPhase[i] ? c : engine.group(omega, picks.mode[i], c);
    }
  }
}
