/**
 * The dispersion image both methods produce, its axes, and its reliability
 * marks.
 *
 * An image is a grid of rows (frequencies) by columns (trial velocities),
 * row-major. `power` is normalised per row so that each row's largest value
 * is 1 (a row with no energy stays 0); `strength` keeps each row's scale
 * before that normalisation (0–1), so that a ridge that fades can be told
 * from one that is merely normalised up.
 *
 * Reliability (per cell, Uint8): RELIABLE (2), MARGINAL (1), UNRELIABLE
 * (0). Each method sets its own rules (phase-shift.ts, multiple-filter.ts)
 * and says why in `notes`, one sentence per rule that marked cells.
 */
import { InputError, describeValue } from '../shared/errors';

export type ImageMethod = 'multiple-filter' | 'phase-shift';

export const RELIABLE = 2;
export const MARGINAL = 1;
export const UNRELIABLE = 0;

export interface DispersionImage {
  method: ImageMethod;
  /** Row frequencies, Hz, ascending. Multiple-filter: the filter centres; phase-shift: the spectral lines used. */
  frequencies: Float64Array;
  /** Column velocities, m/s, ascending (group velocity for multiple-filter, phase velocity for phase-shift). */
  velocities: Float64Array;
  /** Power, row-major (rows × columns), each row scaled to a largest value of 1. */
  power: Float64Array;
  /**
   * Each row's scale before normalisation, 0–1. Phase-shift: the coherence
   * |Σ unit spectra|²/N² of the row's peak (1 for a perfect plane wave).
   * Multiple-filter: the row's envelope peak relative to the image's largest.
   */
  strength: Float64Array;
  /** Multiple-filter: the instantaneous frequency at each cell, Hz (NaN where the envelope vanishes). Null for phase-shift. */
  instantaneousFrequency: Float64Array | null;
  /** RELIABLE, MARGINAL or UNRELIABLE per cell, row-major. */
  reliability: Uint8Array;
  /** Why cells are marked marginal or unreliable, in plain sentences. */
  notes: string[];
  /** What the resolution floor of a pick's sd is made from (ridge.ts). */
  resolution: {
    /** Record length, s (frequency resolution 1/recordSeconds). */
    recordSeconds: number;
    /** Sample interval, s. */
    sampleInterval: number;
    /** Phase-shift: spread length, m. Multiple-filter: 0. */
    spread: number;
    /** Multiple-filter: the travel distance, m (the offset, or the receivers' distance apart). Phase-shift: 0. */
    distance: number;
    /** Number of traces summed. */
    traces: number;
  };
  /** Multiple-filter: the Gaussian filter parameter α of each row. Absent for phase-shift. */
  alpha?: Float64Array;
  /** The record's name, when it had one. */
  name?: string;
}

/** Largest number of rows or columns of an image (common practice for a screen-sized picture). */
export const MAX_AXIS_COUNT = 2000;

/**
 * `count` evenly spaced values from `from` to `to` inclusive, for an image
 * axis. `field` names the axis in messages (e.g. "--freq"), `unit` its unit.
 * Throws InputError unless 0 < from < to are finite and 2 ≤ count ≤ MAX_AXIS_COUNT.
 */
export function linearAxis(from: number, to: number, count: number, field: string, unit: string): Float64Array {
  if (!Number.isFinite(from) || from <= 0) {
    throw new InputError(field, `The ${field} axis must start above 0 ${unit}, but it starts at ${describeValue(from)}.`);
  }
  if (!Number.isFinite(to) || !(to > from)) {
    throw new InputError(field, `The ${field} axis must end above its start (${from} ${unit}), but it ends at ${describeValue(to)}.`);
  }
  if (!Number.isInteger(count) || count < 2 || count > MAX_AXIS_COUNT) {
    throw new InputError(field, `The ${field} axis needs a whole number of points from 2 to ${MAX_AXIS_COUNT}, but it has ${describeValue(count)}.`);
  }
  const out = new Float64Array(count);
  const step = (to - from) / (count - 1);
  for (let i = 0; i < count; i++) out[i] = from + step * i;
  out[count - 1] = to;
  return out;
}

/** Checks a caller's axis: finite, above 0, strictly ascending, 2 to MAX_AXIS_COUNT points. Returns a copy. */
export function checkAxis(values: ArrayLike<number>, field: string, unit: string): Float64Array {
  const n = values.length;
  if (n < 2 || n > MAX_AXIS_COUNT) {
    throw new InputError(field, `The ${field} axis needs from 2 to ${MAX_AXIS_COUNT} points, but it has ${n}.`);
  }
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) {
      throw new InputError(field, `Point ${i + 1} of the ${field} axis must be a number above 0 ${unit}, but it is ${describeValue(v)}.`);
    }
    if (i > 0 && !(v > out[i - 1])) {
      throw new InputError(field, `The ${field} axis must rise from point to point, but point ${i + 1} (${v} ${unit}) does not.`);
    }
    out[i] = v;
  }
  return out;
}

/** Scales each row of a row-major grid to a largest value of 1; returns each row's former largest value. */
export function normaliseRows(grid: Float64Array, rows: number, cols: number): Float64Array {
  const peak = new Float64Array(rows);
  for (let r = 0; r < rows; r++) {
    let m = 0;
    const o = r * cols;
    for (let c = 0; c < cols; c++) if (grid[o + c] > m) m = grid[o + c];
    peak[r] = m;
    if (m > 0) for (let c = 0; c < cols; c++) grid[o + c] /= m;
  }
  return peak;
}
