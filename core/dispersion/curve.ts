/**
 * Love- and Rayleigh-wave dispersion curves over a set of frequencies, columnar.
 *
 * What: per mode, the frequency, period, phase velocity and group velocity
 * at each requested frequency where that mode exists (above its cutoff),
 * in ascending frequency.
 *
 * Method: one layer over a half-space uses the closed forms of
 * love-layer.ts (period equation in its phase-residual form,
 * energy-integral group velocity; Aki & Richards, *Quantitative
 * Seismology*, 2nd ed. 2002, §7.2–7.3), each root started from the previous
 * frequency's (safeguarded Newton, love-layer.ts). N layers use the Thomson–Haskell
 * propagator with the Sturm-count root isolation of love-stack.ts and the
 * energy-integral group velocity of group-velocity.ts. Rayleigh waves
 * (option `wave: 'rayleigh'`, the model carrying P speeds) use the
 * compound-matrix secular function and scanned root isolation of
 * rayleigh-stack.ts (Dunkin 1965, BSSA 55:335), in its fast mode with each
 * frequency's roots checked against its neighbours' (followModes), with U
 * from implicit differentiation of the secular function; modes are numbered by order of
 * phase velocity at each frequency, and places where two branches come
 * close (osculate or cross) are listed in `approaches`.
 *
 * Units: SI in and out (Hz, s, m/s). Accuracy: phase velocity to about
 * 1e-15 relative; group velocity to about 1e-12 relative away from
 * cutoffs, and to about 3e-10 relative just above a cutoff, where U is
 * ill-conditioned in c (|dU/dc| is large), not through a fault (an
 * independent 40-digit audit measured 3.4e-10 there).
 *
 * Failures: bad frequencies throw InputError; a root that did not converge
 * is left out of the curve and listed in `failures` with its solver status.
 */
import { InputError } from '../shared/errors';
import { loveStackGroupVelocity } from './group-velocity';
import {
  loveCutoffHz,
  loveGroupVelocityAt,
  loveModeCount,
  lovePhaseVelocityNear,
  lovePhaseVelocitySolve,
  type TwoLayer,
} from './love-layer';
import { LoveStackSolver, loveStackCutoff, prepareLoveStack } from './love-stack';
import { checkRayleighModel, type LayeredModel } from './model';
import {
  CLOSE_ROOTS_RTOL,
  RayleighStackSolver,
  prepareRayleighStack,
  rayleighStackGroupVelocity,
  type CloseApproach,
} from './rayleigh-stack';

export interface ModeCurve {
  /** Mode number: 0 is the fundamental. */
  mode: number;
  /** Frequencies, Hz, ascending: only those where the mode exists. */
  frequency: Float64Array;
  /** Periods 1/f, s. */
  period: Float64Array;
  /** Phase velocities, m/s. */
  phase: Float64Array;
  /** Group velocities, m/s. */
  group: Float64Array;
}

/** A root the solver could not settle: left out of the curve, reported here. */
export interface CurveFailure {
  mode: number;
  /** Hz. */
  frequency: number;
  status: string;
}

/** The wave type of a dispersion curve. */
export type Wave = 'love' | 'rayleigh';

/**
 * Two neighbouring modes (numbered by order) that come close at one
 * frequency: their branches osculate or cross there, so a mode number can
 * pass from one branch to the other (Rayleigh waves only; Love modes never
 * meet).
 */
export interface BranchApproach {
  /** The lower mode of the pair (mode, mode + 1). */
  mode: number;
  /** Hz. */
  frequency: number;
  /** Smallest phase-velocity gap between the two there, m/s. */
  gap: number;
}

export interface DispersionCurves {
  wave: Wave;
  /** Mode 0 first; a mode absent at every frequency has empty columns. */
  modes: ModeCurve[];
  /** Roots that did not converge (normally empty). */
  failures: CurveFailure[];
  /** Where neighbouring modes come within APPROACH_RTOL of each other (empty for Love waves). */
  approaches: BranchApproach[];
  /** Warnings about the model, one sentence each (e.g. a Poisson's ratio below 0). */
  warnings: string[];
}

export interface CurveOptions {
  /** Number of modes to compute, from the fundamental up. @default 1 */
  modes?: number;
  /** Wave type; Rayleigh waves need a P speed in every layer and the half-space. @default 'love' */
  wave?: Wave;
}

/** Defaults of CurveOptions, resolved once. */
export const CURVE_DEFAULTS: Required<CurveOptions> = { modes: 1, wave: 'love' };

/**
 * Relative phase-velocity gap below which two neighbouring modes are
 * reported as meeting (a local minimum of the gap over frequency, or two
 * roots this close at one frequency): our threshold, not a published one.
 */
export const APPROACH_RTOL = 0.01;

/** Upper limit on the number of modes asked for (common practice: nobody picks more). */
export const MAX_MODES = 100;

function checkModes(modes: number): number {
  if (!Number.isInteger(modes) || modes < 1 || modes > MAX_MODES) {
    throw new InputError('modes', `modes must be a whole number from 1 to ${MAX_MODES}, but it is ${modes}.`);
  }
  return modes;
}

/** Copies and sorts the frequencies, rejecting non-finite or non-positive ones. */
function sortedFrequencies(frequencies: ArrayLike<number>): Float64Array {
  const f = new Float64Array(frequencies.length);
  for (let i = 0; i < f.length; i++) {
    const v = frequencies[i];
    if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) {
      throw new InputError(`frequencies[${i}]`, `frequencies[${i}] must be a finite frequency above 0 Hz, but it is ${v}.`);
    }
    f[i] = v;
  }
  return f.sort();
}

function twoLayer(model: LayeredModel): TwoLayer {
  const l = model.layers[0];
  return { h: l.thickness, vs1: l.vs, rho1: l.density, vs2: model.halfspace.vs, rho2: model.halfspace.density };
}

/**
 * Columns of each mode's curve, filled point by point in ascending
 * frequency (space for every frequency allocated once) and cut to length
 * by `curves()`.
 */
function modeColumns(modes: number, n: number) {
  const cols: Float64Array[][] = [];
  for (let m = 0; m < modes; m++) {
    cols.push([new Float64Array(n), new Float64Array(n), new Float64Array(n), new Float64Array(n)]);
  }
  const counts = new Int32Array(modes);
  return {
    push(m: number, f: number, c: number, u: number): void {
      const i = counts[m]++;
      const col = cols[m];
      col[0][i] = f;
      col[1][i] = 1 / f;
      col[2][i] = c;
      col[3][i] = u;
    },
    curves(): ModeCurve[] {
      return cols.map(([fc, tc, pc, gc], m) => {
        const n = counts[m];
        return { mode: m, frequency: fc.subarray(0, n), period: tc.subarray(0, n), phase: pc.subarray(0, n), group: gc.subarray(0, n) };
      });
    },
  };
}

/**
 * Love-wave dispersion curves of a validated model at the given
 * frequencies (Hz, any order; returned ascending). Throws InputError for a
 * frequency that is not finite and positive, or a bad mode count.
 */
export function loveCurves(
  model: LayeredModel,
  frequencies: ArrayLike<number>,
  options: CurveOptions = {},
): DispersionCurves {
  const modes = checkModes(options.modes ?? CURVE_DEFAULTS.modes);
  const freq = sortedFrequencies(frequencies);
  const nf = freq.length;
  const columns = modeColumns(modes, nf);
  const push = columns.push;
  const failures: CurveFailure[] = [];

  if (model.layers.length === 1) {
    const p = twoLayer(model);
    // The previous frequency's root of each mode starts the next search.
    const previous = new Float64Array(modes).fill(NaN);
    for (let i = 0; i < nf; i++) {
      const f = freq[i];
      const present = Math.min(modes, loveModeCount(p, f));
      for (let m = 0; m < present; m++) {
        const r = lovePhaseVelocityNear(p, f, m, previous[m]);
        previous[m] = r.x;
        if (r.status === 'converged') push(m, f, r.x, loveGroupVelocityAt(p, f, r.x));
        else failures.push({ mode: m, frequency: f, status: r.status });
      }
    }
  } else {
    const stack = prepareLoveStack(model);
    const solver = new LoveStackSolver(stack);
    const roots = new Float64Array(modes);
    for (let i = 0; i < nf; i++) {
      const f = freq[i];
      const omega = 2 * Math.PI * f;
      const found = solver.solve(omega, modes, roots);
      for (let m = 0; m < found; m++) {
        const c = roots[m];
        if (Number.isNaN(c)) failures.push({ mode: m, frequency: f, status: solver.outcome.status });
        else push(m, f, c, loveStackGroupVelocity(stack, omega, c));
      }
    }
  }

  return { wave: 'love', modes: columns.curves(), failures, approaches: [], warnings: [] };
}

function checkWave(wave: unknown): Wave {
  if (wave !== 'love' && wave !== 'rayleigh') {
    throw new InputError('wave', `wave must be "love" or "rayleigh", but it is ${JSON.stringify(wave)}.`);
  }
  return wave;
}

/**
 * Dispersion curves of the wave type in `options.wave` (Love by default):
 * loveCurves or rayleighCurves.
 */
export function dispersionCurves(
  model: LayeredModel,
  frequencies: ArrayLike<number>,
  options: CurveOptions = {},
): DispersionCurves {
  const wave = checkWave(options.wave ?? CURVE_DEFAULTS.wave);
  return wave === 'love' ? loveCurves(model, frequencies, options) : rayleighCurves(model, frequencies, options);
}

/**
 * Rayleigh-wave dispersion curves of a validated model with P speeds, at
 * the given frequencies (Hz, any order; returned ascending). Throws
 * InputError for a model without usable P speeds (checkRayleighModel), a
 * frequency that is not finite and positive, or a bad mode count.
 */
export function rayleighCurves(
  model: LayeredModel,
  frequencies: ArrayLike<number>,
  options: CurveOptions = {},
): DispersionCurves {
  const warnings = checkRayleighModel(model);
  const modes = checkModes(options.modes ?? CURVE_DEFAULTS.modes);
  const freq = sortedFrequencies(frequencies);
  const nf = freq.length;
  const columns = modeColumns(modes, nf);
  // Per frequency index, each mode's phase velocity (NaN when absent), to find where neighbours meet.
  const grid = new Float64Array(modes * nf).fill(NaN);
  const failures: CurveFailure[] = [];
  const approaches: BranchApproach[] = [];
  const stack = prepareRayleighStack(model);
  const solver = new RayleighStackSolver(stack);
  // Each frequency solved in the solver's fast mode, then checked against its neighbours (followModes).
  const solved = followModes(solver, freq, modes);
  for (let i = 0; i < nf; i++) {
    const f = freq[i];
    for (let m = 0; m < solved.found[i]; m++) {
      const c = solved.phase[i * modes + m];
      if (Number.isNaN(c)) {
        failures.push({ mode: m, frequency: f, status: solved.status[i] });
        continue;
      }
      grid[m * nf + i] = c;
      columns.push(m, f, c, solved.group[i * modes + m]);
    }
    for (const a of solved.close[i]) {
      if (a.mode >= 0 && a.mode + 1 < modes) approaches.push({ mode: a.mode, frequency: f, gap: a.gap });
    }
  }
  // Local minima over frequency of the relative gap between neighbouring modes.
  for (let m = 0; m + 1 < modes; m++) {
    const gap = (i: number): number => (grid[(m + 1) * nf + i] - grid[m * nf + i]) / grid[(m + 1) * nf + i];
    for (let i = 0; i < nf; i++) {
      const g = gap(i);
      if (!(g < APPROACH_RTOL) || g <= CLOSE_ROOTS_RTOL) continue; // very close pairs are already listed
      if (i === 0 || i + 1 === nf) continue;
      if (!(g <= gap(i - 1)) || !(g <= gap(i + 1))) continue;
      approaches.push({ mode: m, frequency: freq[i], gap: g * grid[(m + 1) * nf + i] });
    }
  }
  approaches.sort((a, b) => a.frequency - b.frequency || a.mode - b.mode);
  return { wave: 'rayleigh', modes: columns.curves(), failures, approaches, warnings };
}

/** Roots of the lowest modes at each of a sorted list of frequencies (followModes). */
export interface FollowedModes {
  /** Phase velocities, m/s, row-major by frequency: phase[i·modes + m] (NaN: did not converge). */
  phase: Float64Array;
  /** Group velocities, m/s, alike. */
  group: Float64Array;
  /** Roots found at each frequency. */
  found: Int32Array;
  /** Solver status at each frequency. */
  status: string[];
  /** Close approaches met at each frequency (RayleighStackSolver outcome). */
  close: CloseApproach[][];
  /** Frequencies solved a second time with care because their roots disagreed with a neighbour's. */
  resolved: number;
}

/**
 * The lowest `modes` Rayleigh roots and group velocities at ascending
 * frequencies (Hz), each frequency solved by the solver's fast mode
 * (solver.careful = false, rayleigh-stack.ts) and then checked against
 * both neighbours: every root c of a neighbour, carried to this frequency
 * along its branch (dc/dω = (c/ω)(1 − c/U), first order), must find a root
 * of its own here within max(|step|, 1e-4·c), one to one, wherever that
 * prediction lies inside the range scanned here (above the floor and below
 * the last root found or β_H). The first frequency is solved with care.
 * After it, the scan starts
 * just below the previous fundamental carried to this frequency (four
 * steps or 0.4 % below it): a new root lower down would need two roots born
 * together at a double root of F, which we do not expect below the
 * fundamental (our assumption, not a theorem). If a root is not matched, the frequency is solved
 * again with care (the default mode) and its neighbours checked again. Two
 * roots of a close pair missed by the fast scan at one frequency are thus
 * recovered from a neighbour where the scan saw them; a pair missed at
 * every frequency of the band is not. The solver is left careful.
 */
export function followModes(solver: RayleighStackSolver, freq: Float64Array, modes: number): FollowedModes {
  const nf = freq.length;
  const stack = solver.stack;
  const phase = new Float64Array(nf * modes);
  const group = new Float64Array(nf * modes);
  const found = new Int32Array(nf);
  const complete = new Uint8Array(nf);
  const careful = new Uint8Array(nf);
  const status: string[] = new Array<string>(nf).fill('converged');
  const close: CloseApproach[][] = Array.from({ length: nf }, () => []);
  const roots = new Float64Array(modes);
  let resolved = 0;
  const solveAt = (i: number, withCare: boolean, start?: number): void => {
    solver.careful = withCare;
    const omega = 2 * Math.PI * freq[i];
    const n = solver.solve(omega, modes, roots, start);
    found[i] = n;
    complete[i] = solver.outcome.complete ? 1 : 0;
    status[i] = solver.outcome.status;
    close[i] = solver.outcome.close;
    for (let m = 0; m < n; m++) {
      const c = roots[m];
      phase[i * modes + m] = c;
      group[i * modes + m] = Number.isNaN(c) ? NaN : rayleighStackGroupVelocity(stack, omega, c);
    }
  };
  // True when every root of frequency `from`, carried to frequency `to`, has a root of its own there.
  const agrees = (from: number, to: number): boolean => {
    const w0 = 2 * Math.PI * freq[from];
    const w1 = 2 * Math.PI * freq[to];
    const nTo = found[to];
    const high = complete[to] ? stack.vsH : nTo > 0 ? phase[to * modes + nTo - 1] : solver.floor;
    let next = 0; // roots at `to` are ascending; each prediction takes the next free one within reach
    for (let m = 0; m < found[from]; m++) {
      const c = phase[from * modes + m];
      const u = group[from * modes + m];
      if (!(c > 0) || !(u > 0)) continue;
      const step = (c / w0) * (1 - c / u) * (w1 - w0);
      const guess = c + step;
      const tol = Math.max(Math.abs(step), 1e-4 * c);
      if (!(guess - tol > solver.floor) || !(guess + tol < high)) continue;
      while (next < nTo && phase[to * modes + next] < guess - tol) next++;
      if (next >= nTo || !(phase[to * modes + next] <= guess + tol)) return false;
      next++;
    }
    return true;
  };
  // Below the previous frequency's fundamental, carried along its branch, no root is looked for: a root
  // there would have to be born with a partner at a double root of F (not expected below the fundamental);
  // the fundamental itself must then be found above the start, or the check below solves again with care.
  for (let i = 0; i < nf; i++) {
    let start: number | undefined;
    if (i > 0 && found[i - 1] > 0) {
      const c = phase[(i - 1) * modes];
      const u = group[(i - 1) * modes];
      const w0 = 2 * Math.PI * freq[i - 1];
      const step = (c / w0) * (1 - c / u) * (2 * Math.PI * freq[i] - w0);
      if (c > 0 && u > 0) start = c + step - 4 * Math.max(Math.abs(step), 1e-3 * c);
    }
    // The first frequency with care: every root there is found by the careful scan and then carried.
    solveAt(i, i === 0, start);
    if (i === 0) careful[0] = 1;
  }
  // Forward, then backward: a frequency that disagrees with a neighbour is solved again with care.
  for (let pass = 0; pass < 2; pass++) {
    for (let n = 1; n < nf; n++) {
      const i = pass === 0 ? n : nf - 1 - n;
      const j = pass === 0 ? i - 1 : i + 1;
      if (careful[i] || agrees(j, i)) continue;
      solveAt(i, true);
      careful[i] = 1;
      resolved++;
    }
  }
  solver.careful = true;
  return { phase, group, found, status, close, resolved };
}

/**
 * `count` frequencies log-spaced from `from` to `to` inclusive (Hz).
 * Throws InputError unless 0 < from < to are finite and count is a whole
 * number ≥ 2 (or from = to with count 1).
 */
export function logBand(from: number, to: number, count: number): Float64Array {
  if (!Number.isFinite(from) || from <= 0) {
    throw new InputError('from', `The band's lower frequency must be a finite number above 0 Hz, but it is ${from}.`);
  }
  if (!Number.isFinite(to) || to <= 0) {
    throw new InputError('to', `The band's upper frequency must be a finite number above 0 Hz, but it is ${to}.`);
  }
  if (!Number.isInteger(count) || count < 1 || count > 1_000_000) {
    throw new InputError('count', `The band's point count must be a whole number from 1 to 1000000, but it is ${count}.`);
  }
  if (count === 1) {
    if (from !== to) {
      throw new InputError('count', `A band from ${from} Hz to ${to} Hz needs at least 2 points, but the count is 1.`);
    }
    return Float64Array.of(from);
  }
  if (!(to > from)) {
    throw new InputError('to', `The band's upper frequency (${to} Hz) must be above its lower frequency (${from} Hz).`);
  }
  const out = new Float64Array(count);
  const step = Math.log(to / from) / (count - 1);
  for (let i = 0; i < count; i++) out[i] = from * Math.exp(step * i);
  out[count - 1] = to;
  return out;
}

/**
 * Cutoff frequencies (Hz) of modes 0 … modes−1: 0 for the fundamental; for
 * one layer the closed form f_n = n β1 β2 / (2H √(β2² − β1²)); for N layers
 * the root of the secular function at c = β_H (love-stack.ts). A cutoff
 * whose search did not converge is NaN.
 */
export function loveCutoffFrequencies(model: LayeredModel, modes: number): Float64Array {
  checkModes(modes);
  const out = new Float64Array(modes);
  if (model.layers.length === 1) {
    const p = twoLayer(model);
    for (let n = 1; n < modes; n++) out[n] = loveCutoffHz(p, n);
    return out;
  }
  const stack = prepareLoveStack(model);
  for (let n = 1; n < modes; n++) out[n] = loveStackCutoff(stack, n).frequency;
  return out;
}

/**
 * The dimensionless curve of one layer over a half-space: c/β1 and U/β1
 * against x = f·H/β1 at fixed β2/β1 (vsRatio > 1) and ρ2/ρ1 (densityRatio),
 * for mode n (the same numbers as love-layer.ts loveDimensionless, in
 * columns). NaN where the mode does not exist (x at or below its cutoff
 * x_n = n·r / (2√(r² − 1)), r = β2/β1). x in any order; columns follow x.
 */
export function loveDimensionlessCurve(
  vsRatio: number,
  densityRatio: number,
  x: ArrayLike<number>,
  mode: number,
): { phase: Float64Array; group: Float64Array } {
  if (!Number.isFinite(vsRatio) || vsRatio <= 1) {
    throw new InputError('vsRatio', `vsRatio (β2/β1) must be a finite number above 1, but it is ${vsRatio}.`);
  }
  if (!Number.isFinite(densityRatio) || densityRatio <= 0) {
    throw new InputError('densityRatio', `densityRatio (ρ2/ρ1) must be a finite number above 0, but it is ${densityRatio}.`);
  }
  if (!Number.isInteger(mode) || mode < 0) {
    throw new InputError('mode', `mode must be a whole number from 0 up, but it is ${mode}.`);
  }
  const n = x.length;
  const phase = new Float64Array(n);
  const group = new Float64Array(n);
  const p: TwoLayer = { h: 1, vs1: 1, vs2: vsRatio, rho1: 1, rho2: densityRatio };
  for (let i = 0; i < n; i++) {
    const r = lovePhaseVelocitySolve(p, x[i], mode);
    const c = r.status === 'converged' ? r.x : NaN;
    phase[i] = c;
    group[i] = Number.isNaN(c) ? NaN : loveGroupVelocityAt(p, x[i], c);
  }
  return { phase, group };
}
