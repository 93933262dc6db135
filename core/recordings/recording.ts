/**
 * The shape every reader returns (SEG-Y, SEG-2, CSV traces), the geometry the
 * user may override, and the geometry summary the `shearfield record`
 * command prints. Pure: readers build a Recording from bytes and never keep
 * or store anything; a bad file throws one InputError and changes nothing.
 *
 * Units are SI: seconds and metres. Times are relative to the source
 * (trigger): sample k of a trace is at `delay + k * sampleInterval`.
 */
import { InputError } from '../shared/errors';

export type RecordingFormat = 'segy' | 'seg2' | 'csv';

/**
 * The geophone component of the traces. `crossline` and `transverse` are
 * both horizontal and at right angles to the line (the Love-wave case);
 * they differ only in how the file names them (SEG-Y trace id 13 versus 16).
 */
export type Component = 'vertical' | 'inline' | 'crossline' | 'transverse' | 'unknown';

export const COMPONENTS: readonly Component[] = ['vertical', 'inline', 'crossline', 'transverse', 'unknown'];

/** A place in the file's own grid, in metres; NaN where the file does not say. */
export interface Place {
  x: number;
  y: number;
  /** Elevation, m; NaN when not recorded. */
  z: number;
}

export interface Recording {
  format: RecordingFormat;
  /** The file name the user gave (shown, never parsed). */
  name: string;
  /** Sample interval, s (> 0). */
  sampleInterval: number;
  /** Samples in every trace (every `traces[i].length` equals it). */
  samples: number;
  /** Time of the first sample after the source fired, s; negative for a pre-trigger record. */
  delay: number;
  /** One Float64Array of `samples` values per trace, in file order. */
  traces: Float64Array[];
  /** Source–receiver offset per trace, m, signed as the file gives it (negative: far side of the source); NaN when unknown. */
  offsets: Float64Array;
  component: Component;
  /** Source place per trace, or null when the file records none. */
  sources: Place[] | null;
  /** Receiver place per trace, or null when the file records none. */
  receivers: Place[] | null;
  /** The file's own words, for display only: the SEG-Y textual header (its lines, trailing blanks cut) or the SEG-2 NOTE. */
  textHeader?: string;
  /** True when any trace's offset is unknown: the user must give the geometry before an image can be made. */
  missingGeometry: boolean;
  /** Sentences asking the user for what the file does not say (empty when nothing is missing). */
  askFor: string[];
  /** Sentences about what the reader noticed or did (padded traces, replaced values, ignored fields). */
  warnings: string[];
}

/** What the user may set over the file's own geometry. */
export interface GeometryOverrides {
  /** Offsets of a straight, evenly spaced spread: trace k gets `first + k * spacing` (m). */
  offsets?: { first: number; spacing: number };
  /** Time of the first sample after the source fired, s. */
  delay?: number;
  component?: Component;
}

/** The geometry JSON of `shearfield record` (keep the keys exact; NaN offsets print as null). */
export interface GeometrySummary {
  format: RecordingFormat;
  traces: number;
  samples: number;
  sample_interval_s: number;
  delay_s: number;
  offsets_m: (number | null)[];
  component: Component;
}

/** Largest file read, bytes (common practice: a field record is a few MB; 512 MB keeps a wrong file from exhausting a tablet). */
export const MAX_RECORDING_BYTES = 512 * 1024 * 1024;

/** Largest |delay| accepted from a file or the user, s (common practice: field records last seconds, not hours). */
export const MAX_ABS_DELAY_S = 3600;
/** Largest |offset| accepted from the user, m (common practice: a near-surface spread is well under 100 km). */
export const MAX_ABS_OFFSET_M = 100_000;

const ASK_OFFSETS =
  'Give the offset of the first receiver from the source and the receiver spacing, in metres: the file does not record the source–receiver offsets.';
const ASK_COMPONENT =
  'Give the geophone component (vertical, inline, crossline or transverse): the file does not say which it is.';

export function geometrySummary(rec: Recording): GeometrySummary {
  return {
    format: rec.format,
    traces: rec.traces.length,
    samples: rec.samples,
    sample_interval_s: rec.sampleInterval,
    delay_s: rec.delay,
    offsets_m: Array.from(rec.offsets, (o) => (Number.isFinite(o) ? o : null)),
    component: rec.component,
  };
}

/**
 * Fills in `missingGeometry` and `askFor` from the offsets and component.
 * Offsets beyond ±MAX_ABS_OFFSET_M (junk in a file's header) become unknown,
 * with a warning, so that the user is asked for them. Readers call it last,
 * and so does applyOverrides.
 */
export function withGeometryQuestions(rec: Omit<Recording, 'missingGeometry' | 'askFor'>): Recording {
  let { offsets, warnings } = rec;
  const absurd: number[] = [];
  offsets.forEach((o, k) => {
    if (Math.abs(o) > MAX_ABS_OFFSET_M) absurd.push(k + 1);
  });
  if (absurd.length > 0) {
    offsets = offsets.map((o) => (Math.abs(o) > MAX_ABS_OFFSET_M ? NaN : o));
    const shown = absurd.length > 10 ? `${absurd.slice(0, 10).join(', ')} and ${absurd.length - 10} more` : absurd.join(', ');
    warnings = [...warnings, `The offsets of trace${absurd.length > 1 ? 's' : ''} ${shown} lie beyond ±${MAX_ABS_OFFSET_M} m; they are taken as unknown.`];
  }
  const missingGeometry = offsets.length === 0 || offsets.some((o) => !Number.isFinite(o));
  const askFor: string[] = [];
  if (missingGeometry) askFor.push(ASK_OFFSETS);
  if (rec.component === 'unknown') askFor.push(ASK_COMPONENT);
  return { ...rec, offsets, warnings, missingGeometry, askFor };
}

function checkFinite(value: number, field: string, what: string, limit: number, unit: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new InputError(field, `The ${what} must be a number, but it is ${String(value)}.`);
  }
  if (Math.abs(value) > limit) {
    throw new InputError(field, `The ${what} must lie within ±${limit} ${unit}, but it is ${value} ${unit}.`);
  }
}

/** Checks overrides, throwing one InputError naming the field; returns nothing. */
export function checkOverrides(o: GeometryOverrides, traces: number): void {
  if (o.offsets !== undefined) {
    checkFinite(o.offsets.first, 'offsets.first', 'offset of the first receiver', MAX_ABS_OFFSET_M, 'm');
    checkFinite(o.offsets.spacing, 'offsets.spacing', 'receiver spacing', MAX_ABS_OFFSET_M, 'm');
    if (traces > 1 && o.offsets.spacing === 0) {
      throw new InputError('offsets.spacing', `The receiver spacing must not be 0 m for a record of ${traces} traces.`);
    }
    const last = o.offsets.first + (traces - 1) * o.offsets.spacing;
    if (Math.abs(last) > MAX_ABS_OFFSET_M) {
      throw new InputError('offsets.spacing', `The last receiver would be ${last} m from the source; offsets must lie within ±${MAX_ABS_OFFSET_M} m.`);
    }
  }
  if (o.delay !== undefined) checkFinite(o.delay, 'delay', 'trigger delay', MAX_ABS_DELAY_S, 's');
  if (o.component !== undefined && !COMPONENTS.includes(o.component)) {
    throw new InputError('component', `The component must be one of ${COMPONENTS.join(', ')}, but it is ${JSON.stringify(String(o.component))}.`);
  }
}

/**
 * The recording with the user's geometry in place of the file's. Checks
 * every override first (an InputError names the field; nothing changes);
 * returns a new Recording (the traces are shared, not copied) whose warnings
 * say which of the file's values were replaced.
 */
export function applyOverrides(rec: Recording, o: GeometryOverrides = {}): Recording {
  checkOverrides(o, rec.traces.length);
  const warnings = [...rec.warnings];
  let offsets = rec.offsets;
  let { delay, component } = rec;
  if (o.offsets !== undefined) {
    const fileHad = rec.offsets.some((v) => Number.isFinite(v));
    offsets = new Float64Array(rec.traces.length);
    for (let k = 0; k < offsets.length; k++) offsets[k] = o.offsets.first + k * o.offsets.spacing;
    if (fileHad) warnings.push(`The file's offsets are replaced by the given ones (first ${o.offsets.first} m, spacing ${o.offsets.spacing} m).`);
  }
  if (o.delay !== undefined) {
    if (o.delay !== rec.delay) warnings.push(`The file's delay of ${rec.delay} s is replaced by the given ${o.delay} s.`);
    delay = o.delay;
  }
  if (o.component !== undefined) {
    if (rec.component !== 'unknown' && o.component !== rec.component) {
      warnings.push(`The file names the component ${rec.component}; the given ${o.component} is used instead.`);
    }
    component = o.component;
  }
  const { missingGeometry: _m, askFor: _a, ...rest } = rec;
  return withGeometryQuestions({ ...rest, offsets, delay, component, warnings });
}
