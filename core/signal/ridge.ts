/**
 * Following a ridge of a dispersion image from one tapped point, and
 * turning the ridge into picks.
 *
 * Method (common practice; shared/PHYSICS.md §10): from the tap, take the
 * local maximum along velocity within ±20 % of the tapped velocity; then
 * march row by row towards higher and lower frequencies. Each step
 * predicts the velocity by extending the last two points in a straight
 * line, takes the local maximum within ±10 % of the prediction, and refines
 * it with the parabola through the peak cell and its two neighbours. The
 * march stops, and says why, where
 *  - the ridge fades (its power times the row's strength falls under a
 *    floor, or under 15 % of the tapped point's),
 *  - the ridge leaves the reliable band (a cell marked UNRELIABLE),
 *  - the ridge jumps (the largest value in the window sits on its edge, or
 *    more than 8 % from the prediction), or
 *  - the image ends.
 *
 * Each point's sd is the standard deviation of a Gaussian with the ridge's
 * half-power width there, W/(2√(2 ln 2)) (common practice), but never less
 * than the floor the record sets: one resolution cell of the record
 * (slowness 1/(f·L) over a spread L for phase-shift; one sample interval of
 * travel time for multiple-filter; frequency 1/T over a record of length T
 * times the ridge's slope), as the sd of a uniform spread over that cell
 * (cell/√12). Points in a MARGINAL band get at least 5 % of their velocity
 * (common practice).
 *
 * Group-velocity points (multiple-filter) take their frequency from the
 * instantaneous frequency at the peak (multiple-filter.ts).
 */
import { type Pick, validatePick } from '../picks/picks';
import { InputError } from '../shared/errors';
import { MARGINAL, RELIABLE, UNRELIABLE, type DispersionImage } from './image';

export type RidgeStop = 'faded' | 'left-reliable-band' | 'jumped' | 'image-edge';

export interface Ridge {
  /** Row index of each point, ascending. */
  rows: Int32Array;
  /** Hz: the row frequency (phase-shift) or the instantaneous frequency at the peak (multiple-filter). */
  frequency: Float64Array;
  /** m/s, parabola-refined. */
  velocity: Float64Array;
  /** m/s: from the half-power width, with the floors above. */
  sd: Float64Array;
  /** RELIABLE or MARGINAL per point. */
  level: Uint8Array;
  /** Why the march stopped below the lowest and above the highest point. */
  stops: { low: RidgeStop; high: RidgeStop };
  /** Empty when the ridge has points; else why there is none at the tap, in one sentence. */
  reason: string;
}

/** First-step window (fraction of the tapped velocity). */
export const SEED_WINDOW = 0.2;
/** Later steps' window (fraction of the predicted velocity). */
export const STEP_WINDOW = 0.1;
/** A peak further than this fraction from the prediction is a jump. */
export const JUMP_FRACTION = 0.08;
/** The ridge fades under this fraction of the tapped point's value. */
export const FADE_FRACTION = 0.15;
/** sd of a MARGINAL point: at least this fraction of its velocity. */
export const MARGINAL_SD_FRACTION = 0.05;
/** Half-power full width W to Gaussian sd: W / (2√(2 ln 2)). */
const FWHM_TO_SD = 1 / (2 * Math.sqrt(2 * Math.LN2));

/** The absolute fade floor of an image's values (power × strength). */
function fadeFloor(image: DispersionImage): number {
  // Phase-shift: noise alone gives a coherence near 1/N; 3/N keeps clear of it.
  // Multiple-filter: an envelope under 10 % of the record's strongest (power 0.01).
  return image.method === 'phase-shift' ? Math.min(0.5, 3 / image.resolution.traces) : 0.01;
}

interface Peak {
  col: number;
  velocity: number;
  value: number;
}

/** Vertex of the parabola through (x0,y0), (x1,y1), (x2,y2), x0 < x1 < x2, y1 the largest. */
function vertex(x0: number, y0: number, x1: number, y1: number, x2: number, y2: number): { x: number; y: number } {
  const d0 = (y1 - y0) / (x1 - x0);
  const d1 = (y2 - y1) / (x2 - x1);
  const a = (d1 - d0) / (x2 - x0);
  if (!(a < 0)) return { x: x1, y: y1 };
  const b = d0 - a * (x0 + x1);
  let x = -b / (2 * a);
  x = Math.min(Math.max(x, x0), x2);
  const y = y1 + d0 * (x - x1) + a * (x - x0) * (x - x1);
  return { x, y };
}

/** The peak within [vLo, vHi] in a row, refined; `edge` when it sits on the window or image edge. */
function peakIn(image: DispersionImage, row: number, vLo: number, vHi: number): Peak | 'edge' | 'empty' {
  const v = image.velocities;
  const cols = v.length;
  const o = row * cols;
  let lo = 0;
  while (lo < cols && v[lo] < vLo) lo++;
  let hi = cols - 1;
  while (hi >= 0 && v[hi] > vHi) hi--;
  // At least two cells either side of the centre.
  const mid = Math.round((lo + hi) / 2);
  lo = Math.max(0, Math.min(lo, mid - 2));
  hi = Math.min(cols - 1, Math.max(hi, mid + 2));
  if (hi < lo) return 'empty';
  let best = lo;
  for (let c = lo + 1; c <= hi; c++) if (image.power[o + c] > image.power[o + best]) best = c;
  if (best === 0 || best === cols - 1) return 'edge';
  const p = image.power;
  if (p[o + best - 1] >= p[o + best] || p[o + best + 1] > p[o + best]) return 'edge';
  const r = vertex(v[best - 1], p[o + best - 1], v[best], p[o + best], v[best + 1], p[o + best + 1]);
  return { col: best, velocity: r.x, value: r.y };
}

/** Half-power full width of the peak at `col` in `row`, m/s (an edge reached counts as the width so far, doubled). */
function halfPowerWidth(image: DispersionImage, row: number, col: number, value: number): number {
  const v = image.velocities;
  const cols = v.length;
  const p = image.power;
  const o = row * cols;
  const half = value / 2;
  const side = (dir: 1 | -1): number => {
    let c = col;
    while (c + dir >= 0 && c + dir < cols && p[o + c + dir] > half) c += dir;
    if (c + dir < 0 || c + dir >= cols) return NaN;
    const a = p[o + c];
    const b = p[o + c + dir];
    const w = a === b ? 0 : (a - half) / (a - b);
    return Math.abs(v[c] + w * (v[c + dir] - v[c]) - v[col]);
  };
  const left = side(-1);
  const right = side(1);
  if (Number.isFinite(left) && Number.isFinite(right)) return left + right;
  if (Number.isFinite(left)) return 2 * left;
  if (Number.isFinite(right)) return 2 * right;
  return v[cols - 1] - v[0];
}

/** Frequency of a point: the row's, or (multiple-filter) the instantaneous frequency interpolated at the velocity. */
function pointFrequency(image: DispersionImage, row: number, col: number, velocity: number): number {
  const inst = image.instantaneousFrequency;
  const fRow = image.frequencies[row];
  if (inst === null) return fRow;
  const v = image.velocities;
  const o = row * v.length;
  const c2 = velocity >= v[col] ? Math.min(col + 1, v.length - 1) : Math.max(col - 1, 0);
  const a = inst[o + col];
  const b = inst[o + c2];
  if (!Number.isFinite(a) || a <= 0) return fRow;
  if (c2 === col || !Number.isFinite(b) || b <= 0) return a;
  const w = (velocity - v[col]) / (v[c2] - v[col]);
  return a + w * (b - a);
}

interface Step {
  row: number;
  col: number;
  velocity: number;
  value: number;
}

/**
 * Follows the ridge through a tapped point (frequency in Hz, velocity in
 * m/s) of an image. Throws InputError for a tap that is not a finite point
 * inside the image's axes. A tap with no ridge under it gives an empty
 * ridge with the reason.
 */
export function followRidge(image: DispersionImage, tap: { frequency: number; velocity: number }): Ridge {
  const f = image.frequencies;
  const v = image.velocities;
  const rows = f.length;
  const cols = v.length;
  if (!Number.isFinite(tap.frequency) || tap.frequency < f[0] * 0.5 || tap.frequency > f[rows - 1] * 1.5) {
    throw new InputError('tap.frequency', `The tapped frequency must lie on the image (${f[0].toFixed(2)}–${f[rows - 1].toFixed(2)} Hz), but it is ${tap.frequency}.`);
  }
  if (!Number.isFinite(tap.velocity) || tap.velocity < v[0] || tap.velocity > v[cols - 1]) {
    throw new InputError('tap.velocity', `The tapped velocity must lie on the image (${v[0]}–${v[cols - 1]} m/s), but it is ${tap.velocity}.`);
  }
  let r0 = 0;
  for (let i = 1; i < rows; i++) if (Math.abs(f[i] - tap.frequency) < Math.abs(f[r0] - tap.frequency)) r0 = i;
  const empty = (reason: string, stop: RidgeStop): Ridge => ({
    rows: new Int32Array(0),
    frequency: new Float64Array(0),
    velocity: new Float64Array(0),
    sd: new Float64Array(0),
    level: new Uint8Array(0),
    stops: { low: stop, high: stop },
    reason,
  });
  const seed = peakIn(image, r0, tap.velocity * (1 - SEED_WINDOW), tap.velocity * (1 + SEED_WINDOW));
  if (seed === 'edge' || seed === 'empty') {
    return empty(`No ridge peaks within ${SEED_WINDOW * 100} % of ${tap.velocity.toFixed(0)} m/s at ${f[r0].toFixed(2)} Hz.`, 'jumped');
  }
  const seedValue = seed.value * image.strength[r0];
  const floor = Math.max(fadeFloor(image), FADE_FRACTION * seedValue);
  if (image.reliability[r0 * cols + seed.col] === UNRELIABLE) {
    return empty(`The ridge at ${f[r0].toFixed(2)} Hz and ${seed.velocity.toFixed(0)} m/s lies in the unreliable band (${image.notes[0] ?? ''})`.trim(), 'left-reliable-band');
  }
  if (seedValue < fadeFloor(image)) {
    return empty(`The ridge at ${f[r0].toFixed(2)} Hz is too faint to follow.`, 'faded');
  }
  const start: Step = { row: r0, col: seed.col, velocity: seed.velocity, value: seed.value };

  const march = (dir: 1 | -1): { steps: Step[]; stop: RidgeStop } => {
    const steps: Step[] = [];
    let prev: Step | null = null;
    let last = start;
    for (let row = r0 + dir; row >= 0 && row < rows; row += dir) {
      let pred = last.velocity;
      if (prev !== null) {
        const slope = (last.velocity - prev.velocity) / (f[last.row] - f[prev.row]);
        pred = last.velocity + slope * (f[row] - f[last.row]);
        pred = Math.min(Math.max(pred, last.velocity * (1 - STEP_WINDOW)), last.velocity * (1 + STEP_WINDOW));
      }
      const pk = peakIn(image, row, pred * (1 - STEP_WINDOW), pred * (1 + STEP_WINDOW));
      if (pk === 'empty') return { steps, stop: 'image-edge' };
      if (pk === 'edge' || Math.abs(pk.velocity - pred) > JUMP_FRACTION * pred) return { steps, stop: 'jumped' };
      if (pk.value * image.strength[row] < floor) return { steps, stop: 'faded' };
      if (image.reliability[row * cols + pk.col] === UNRELIABLE) return { steps, stop: 'left-reliable-band' };
      const step = { row, col: pk.col, velocity: pk.velocity, value: pk.value };
      steps.push(step);
      prev = last;
      last = step;
    }
    return { steps, stop: 'image-edge' };
  };
  const up = march(1);
  const down = march(-1);
  const all = [...down.steps.reverse(), start, ...up.steps];

  const n = all.length;
  const out: Ridge = {
    rows: new Int32Array(n),
    frequency: new Float64Array(n),
    velocity: new Float64Array(n),
    sd: new Float64Array(n),
    level: new Uint8Array(n),
    stops: { low: down.stop, high: up.stop },
    reason: '',
  };
  for (let k = 0; k < n; k++) {
    const s = all[k];
    out.rows[k] = s.row;
    out.velocity[k] = s.velocity;
    out.frequency[k] = pointFrequency(image, s.row, s.col, s.velocity);
    out.level[k] = image.reliability[s.row * cols + s.col] === MARGINAL ? MARGINAL : RELIABLE;
  }
  for (let k = 0; k < n; k++) {
    const s = all[k];
    const width = halfPowerWidth(image, s.row, s.col, s.value);
    const a = Math.max(0, k - 1);
    const b = Math.min(n - 1, k + 1);
    const slope = b > a ? (out.velocity[b] - out.velocity[a]) / (image.frequencies[out.rows[b]] - image.frequencies[out.rows[a]]) : 0;
    out.sd[k] = Math.max(width * FWHM_TO_SD, sdFloor(image, image.frequencies[s.row], s.velocity, slope));
    if (out.level[k] === MARGINAL) out.sd[k] = Math.max(out.sd[k], MARGINAL_SD_FRACTION * s.velocity);
  }
  return out;
}

/**
 * The smallest sd a pick from this image can have, m/s (see the header):
 * one resolution cell of the record, as the sd of a uniform spread over it.
 */
export function sdFloor(image: DispersionImage, frequency: number, velocity: number, slope: number): number {
  const res = image.resolution;
  const cellByLength = Math.abs(slope) / res.recordSeconds;
  const cellByGeometry =
    image.method === 'phase-shift'
      ? (velocity * velocity) / (frequency * res.spread)
      : (velocity * velocity * res.sampleInterval) / res.distance;
  return Math.hypot(cellByLength, cellByGeometry) / Math.sqrt(12);
}

/**
 * A place to start on the strongest fundamental ridge: the row nearest
 * `seedHz` (or, without it, the strongest row whose peak is RELIABLE), and
 * in it the slowest local maximum at least half the row's peak among
 * RELIABLE cells (the fundamental Love mode is the slowest at a given
 * frequency). Null when no row has such a peak.
 */
export function strongestRidgeSeed(image: DispersionImage, seedHz?: number): { frequency: number; velocity: number } | null {
  const f = image.frequencies;
  const cols = image.velocities.length;
  const candidates: number[] = [];
  if (seedHz !== undefined) {
    if (!Number.isFinite(seedHz) || seedHz <= 0) {
      throw new InputError('seed-hz', `The seed frequency must be a number above 0 Hz, but it is ${seedHz}.`);
    }
    let r = 0;
    for (let i = 1; i < f.length; i++) if (Math.abs(f[i] - seedHz) < Math.abs(f[r] - seedHz)) r = i;
    candidates.push(r);
  } else {
    const order = Array.from(f.keys()).sort((a, b) => image.strength[b] - image.strength[a]);
    candidates.push(...order);
  }
  for (const r of candidates) {
    const o = r * cols;
    for (let c = 1; c < cols - 1; c++) {
      const p = image.power[o + c];
      if (p >= 0.5 && p > image.power[o + c - 1] && p >= image.power[o + c + 1] && image.reliability[o + c] === RELIABLE) {
        return { frequency: f[r], velocity: image.velocities[c] };
      }
    }
  }
  return null;
}

export interface RidgePickOptions {
  /** Mode number of the ridge. @default 0 */
  mode?: number;
}

/**
 * The ridge's points as picks (core/picks): kind group for a
 * multiple-filter image, phase for phase-shift; the note names the record
 * and the image, and says when a point is in a marginal band. Each pick is
 * checked with the picks' own rules (validatePick), so a ridge beyond the
 * picks' limits throws that InputError.
 */
export function ridgePicks(image: DispersionImage, ridge: Ridge, options: RidgePickOptions = {}): Pick[] {
  const mode = options.mode ?? 0;
  const kind = image.method === 'phase-shift' ? 'phase' : 'group';
  const source = `${image.name ?? 'record'}, ${image.method} image`;
  const out: Pick[] = [];
  for (let k = 0; k < ridge.velocity.length; k++) {
    const note = ridge.level[k] === MARGINAL ? `${source}; marginal band` : source;
    out.push(
      validatePick(
        { frequency: ridge.frequency[k], velocity: ridge.velocity[k], kind, mode, sd: ridge.sd[k], note },
        `ridge point ${k + 1}`,
      ),
    );
  }
  return out;
}
