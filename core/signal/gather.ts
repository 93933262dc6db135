/**
 * The traces a dispersion image is made from, and their one validation step.
 *
 * A gather is one or more traces of equal length on a common time axis with
 * the source–receiver distance of each. Time: sample k of every trace is at
 * t = startTime + k·sampleInterval after the source instant (startTime is
 * SEG-Y's delay recording time and SEG-2's DELAY; negative = pre-trigger
 * samples). Offsets are distances in m (≥ 0); for Love waves on a line,
 * the horizontal source–receiver distance.
 *
 * Limits (common practice, chosen for this tool): 1–1024 traces, 16 to
 * 1,048,576 samples per trace, a sample interval from 1 µs to 1 s, offsets
 * up to 100 km.
 */
import type { Recording } from '../recordings/recording';
import { InputError, describeValue } from '../shared/errors';

export interface Gather {
  /** One array per trace, all the same length. */
  traces: readonly Float64Array[];
  /** Sample interval, s. */
  sampleInterval: number;
  /** Time of the first sample after the source instant, s. */
  startTime: number;
  /** Source–receiver distance of each trace, m. */
  offsets: ArrayLike<number>;
  /** The record's name (file name), carried into the picks' notes. */
  name?: string;
}

export const GATHER_LIMITS = {
  maxTraces: 1024,
  minSamples: 16,
  maxSamples: 1 << 20,
  minSampleInterval: 1e-6,
  maxSampleInterval: 1,
  maxOffset: 100_000,
} as const;

/** The spread of a gather's offsets: its length and receiver spacing. */
export interface Spread {
  /** Distance from the nearest to the farthest receiver, m (0 for one trace). */
  length: number;
  /**
   * Receiver spacing, m: the median gap between neighbouring distinct
   * offsets (common practice for a nearly regular line); 0 for one offset.
   */
  spacing: number;
  /** Offsets sorted ascending. */
  sorted: Float64Array;
  /** True when the sorted offsets are evenly spaced (to 1e-6 of the spacing). */
  regular: boolean;
}

/**
 * Checks a gather once, naming the field and the reason. `minTraces` is the
 * fewest traces the method needs. Returns the offsets as a Float64Array.
 */
export function checkGather(g: Gather, minTraces: number, field = 'record'): Float64Array {
  if (!g || typeof g !== 'object' || !Array.isArray(g.traces)) {
    throw new InputError(field, `The ${field} must hold a list of traces.`);
  }
  const n = g.traces.length;
  if (n < minTraces) {
    throw new InputError(`${field}.traces`, `The ${field} has ${n} trace${n === 1 ? '' : 's'}, but this method needs at least ${minTraces}.`);
  }
  if (n > GATHER_LIMITS.maxTraces) {
    throw new InputError(`${field}.traces`, `The ${field} has ${n} traces, more than the ${GATHER_LIMITS.maxTraces} this tool handles.`);
  }
  const len = g.traces[0]?.length ?? 0;
  if (len < GATHER_LIMITS.minSamples || len > GATHER_LIMITS.maxSamples) {
    throw new InputError(
      `${field}.samples`,
      `The ${field}'s traces have ${len} samples, outside the ${GATHER_LIMITS.minSamples}–${GATHER_LIMITS.maxSamples} this tool handles.`,
    );
  }
  for (let j = 0; j < n; j++) {
    const t = g.traces[j];
    if (!(t instanceof Float64Array) || t.length !== len) {
      throw new InputError(`${field}.traces[${j + 1}]`, `Trace ${j + 1} of the ${field} must have ${len} samples like trace 1, but it has ${t?.length ?? 'none'}.`);
    }
    for (let k = 0; k < len; k++) {
      if (!Number.isFinite(t[k])) {
        throw new InputError(`${field}.traces[${j + 1}]`, `Trace ${j + 1} of the ${field} has a sample that is not a finite number at sample ${k + 1}.`);
      }
    }
  }
  const dt = g.sampleInterval;
  if (typeof dt !== 'number' || !Number.isFinite(dt) || dt < GATHER_LIMITS.minSampleInterval || dt > GATHER_LIMITS.maxSampleInterval) {
    throw new InputError(
      `${field}.sampleInterval`,
      `The ${field}'s sample interval must be from ${GATHER_LIMITS.minSampleInterval} to ${GATHER_LIMITS.maxSampleInterval} s, but it is ${describeValue(dt)}.`,
    );
  }
  const t0 = g.startTime;
  if (typeof t0 !== 'number' || !Number.isFinite(t0) || Math.abs(t0) > len * dt) {
    throw new InputError(
      `${field}.startTime`,
      `The ${field}'s start time (delay) must be a finite number of seconds no longer than the record (${len * dt} s), but it is ${describeValue(t0)}.`,
    );
  }
  if (!g.offsets || g.offsets.length !== n) {
    throw new InputError(`${field}.offsets`, `The ${field} needs one offset per trace (${n}), but it has ${g.offsets?.length ?? 0}.`);
  }
  const offsets = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const x = g.offsets[j];
    if (typeof x !== 'number' || !Number.isFinite(x) || x < 0 || x > GATHER_LIMITS.maxOffset) {
      throw new InputError(
        `${field}.offsets[${j + 1}]`,
        `The offset of trace ${j + 1} must be a distance from 0 to ${GATHER_LIMITS.maxOffset} m, but it is ${describeValue(x)}.`,
      );
    }
    offsets[j] = x;
  }
  return offsets;
}

/** The spread (length, spacing, regularity) of a set of offsets. */
export function spreadOf(offsets: ArrayLike<number>): Spread {
  const sorted = Float64Array.from(offsets).sort();
  const n = sorted.length;
  const length = n > 0 ? sorted[n - 1] - sorted[0] : 0;
  const gaps: number[] = [];
  for (let j = 1; j < n; j++) {
    const d = sorted[j] - sorted[j - 1];
    if (d > 1e-9 * Math.max(1, length)) gaps.push(d);
  }
  gaps.sort((a, b) => a - b);
  const spacing = gaps.length === 0 ? 0 : gaps[Math.floor((gaps.length - 1) / 2)];
  let regular = gaps.length === n - 1 && n > 1;
  for (const d of gaps) if (Math.abs(d - spacing) > 1e-6 * spacing) regular = false;
  return { length, spacing, sorted, regular };
}

/**
 * The gather of a recording read by core/recordings: offsets become
 * distances |x| (a trace on the far side of the source counts by its
 * distance). A recording whose geometry is missing throws the reader's own
 * question as an InputError (offsets are asked for, never guessed).
 */
export function gatherOfRecording(rec: Recording): Gather {
  if (rec.missingGeometry) {
    throw new InputError('offsets', rec.askFor[0] ?? `The recording "${rec.name}" has no offsets; give the first offset and the spacing.`);
  }
  return {
    traces: rec.traces,
    sampleInterval: rec.sampleInterval,
    startTime: rec.delay,
    offsets: Float64Array.from(rec.offsets, Math.abs),
    name: rec.name,
  };
}
