/**
 * The rules of a recording record (core/exchange/records.ts RecordingRecord):
 * its geometry JSON and overrides are data from a file or another device,
 * so every type and bound is checked here, once, for the field store, bundles
 * and the office. A bad value throws one InputError naming the field.
 *
 * Bounds (common practice for this tool, no published source): a name of
 * 1–200 printable characters, at most MAX_RECORDING_TRACES traces and
 * MAX_RECORDING_SAMPLES samples per trace, a sample interval above 0 and at
 * most 1 s, delays and offsets within the readers' own limits
 * (core/recordings/recording.ts).
 */
import { InputError, describeValue } from '../shared/errors';
import { MAX_RECORDING_BYTES } from '../recordings/recording';
import {
  checkOverrides,
  COMPONENTS,
  MAX_ABS_DELAY_S,
  MAX_ABS_OFFSET_M,
  type Component,
  type GeometryOverrides,
  type RecordingFormat,
} from '../recordings/recording';
import type { RecordingGeometryJson } from './records';

export const RECORDING_FORMATS: readonly RecordingFormat[] = ['segy', 'seg2', 'csv'];
/** Most traces a kept recording may have (its offsets travel in the record). */
export const MAX_RECORDING_TRACES = 10_000;
/** Most samples per trace of a kept recording. */
export const MAX_RECORDING_SAMPLES = 10_000_000;
/** Longest sample interval, s (as the SEG-2 reader). */
export const MAX_SAMPLE_INTERVAL_S = 1;
/** Longest file name kept. */
export const MAX_RECORDING_NAME = 200;
export { MAX_RECORDING_BYTES };

// C0 control characters other than tab, line feed and carriage return.
// eslint-disable-next-line no-control-regex
const CONTROL_CHARS = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/;
const SHA256_HEX = /^[0-9a-f]{64}$/;

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function onlyKeys(v: Record<string, unknown>, allowed: readonly string[], field: string): void {
  for (const k of Object.keys(v)) {
    if (!allowed.includes(k)) throw new InputError(`${field}.${k}`, `${field} has an unknown field ${describeValue(k)}.`);
  }
}

function wholeIn(v: unknown, field: string, lo: number, hi: number): number {
  if (typeof v !== 'number' || !Number.isInteger(v) || v < lo || v > hi) {
    throw new InputError(field, `${field} must be a whole number from ${lo} to ${hi}, but it is ${describeValue(v)}.`);
  }
  return v;
}

function finiteIn(v: unknown, field: string, lo: number, hi: number, unit: string, loOpen = false): number {
  if (typeof v !== 'number' || !Number.isFinite(v)) {
    throw new InputError(field, `${field} must be a finite number in ${unit}, but it is ${describeValue(v)}.`);
  }
  if ((loOpen ? v <= lo : v < lo) || v > hi) {
    throw new InputError(field, `${field} is ${v} ${unit}; it must be ${loOpen ? 'above' : 'at least'} ${lo} and at most ${hi} ${unit}.`);
  }
  return v;
}

/** The file name: 1–200 printable characters. */
export function checkRecordingName(v: unknown, field = 'name'): string {
  if (typeof v !== 'string') throw new InputError(field, `${field} must be the file name as text, but it is ${describeValue(v)}.`);
  if (v.trim() === '') throw new InputError(field, `${field} is empty; give the file's name.`);
  if (v.length > MAX_RECORDING_NAME) throw new InputError(field, `${field} is ${v.length} characters long; the limit is ${MAX_RECORDING_NAME}.`);
  if (CONTROL_CHARS.test(v)) throw new InputError(field, `${field} contains a control character; only printable text is allowed.`);
  return v;
}

/** Checks the geometry JSON of a recording (types and bounds); returns a clean copy. */
export function checkRecordingGeometry(v: unknown, field = 'geometry'): RecordingGeometryJson {
  if (!isObject(v)) throw new InputError(field, `${field} must be an object, but it is ${describeValue(v)}.`);
  onlyKeys(v, ['format', 'traces', 'samples', 'sample_interval_s', 'delay_s', 'offsets_m', 'component'], field);
  if (!RECORDING_FORMATS.includes(v.format as RecordingFormat)) {
    throw new InputError(`${field}.format`, `${field}.format must be one of ${RECORDING_FORMATS.join(', ')}, but it is ${describeValue(v.format)}.`);
  }
  const traces = wholeIn(v.traces, `${field}.traces`, 1, MAX_RECORDING_TRACES);
  const samples = wholeIn(v.samples, `${field}.samples`, 1, MAX_RECORDING_SAMPLES);
  const interval = finiteIn(v.sample_interval_s, `${field}.sample_interval_s`, 0, MAX_SAMPLE_INTERVAL_S, 's', true);
  const delay = finiteIn(v.delay_s, `${field}.delay_s`, -MAX_ABS_DELAY_S, MAX_ABS_DELAY_S, 's');
  if (!Array.isArray(v.offsets_m)) throw new InputError(`${field}.offsets_m`, `${field}.offsets_m must be a list of offsets in m, but it is ${describeValue(v.offsets_m)}.`);
  if (v.offsets_m.length !== traces) {
    throw new InputError(`${field}.offsets_m`, `${field}.offsets_m has ${v.offsets_m.length} offsets for ${traces} traces; give one per trace (null where unknown).`);
  }
  const offsets = v.offsets_m.map((o, k) => (o === null ? null : finiteIn(o, `${field}.offsets_m[${k}]`, -MAX_ABS_OFFSET_M, MAX_ABS_OFFSET_M, 'm')));
  if (!COMPONENTS.includes(v.component as Component)) {
    throw new InputError(`${field}.component`, `${field}.component must be one of ${COMPONENTS.join(', ')}, but it is ${describeValue(v.component)}.`);
  }
  return {
    format: v.format as RecordingFormat,
    traces,
    samples,
    sample_interval_s: interval,
    delay_s: delay,
    offsets_m: offsets,
    component: v.component as Component,
  };
}

/** Checks the crew's geometry overrides (types first, then the readers' bounds); returns a clean copy. */
export function checkRecordingOverrides(v: unknown, traces: number, field = 'overrides'): GeometryOverrides {
  if (v === undefined) return {};
  if (!isObject(v)) throw new InputError(field, `${field} must be an object, but it is ${describeValue(v)}.`);
  onlyKeys(v, ['offsets', 'delay', 'component'], field);
  const out: GeometryOverrides = {};
  if (v.offsets !== undefined) {
    if (!isObject(v.offsets)) throw new InputError(`${field}.offsets`, `${field}.offsets must be an object {first, spacing} in m, but it is ${describeValue(v.offsets)}.`);
    onlyKeys(v.offsets, ['first', 'spacing'], `${field}.offsets`);
    out.offsets = { first: v.offsets.first as number, spacing: v.offsets.spacing as number };
  }
  if (v.delay !== undefined) out.delay = v.delay as number;
  if (v.component !== undefined) out.component = v.component as Component;
  try {
    checkOverrides(out, traces);
  } catch (e) {
    if (e instanceof InputError) throw new InputError(`${field}.${e.field}`, e.message);
    throw e;
  }
  return out;
}

/** Checks the recording-specific fields of a record (the store and bundles check the common fields). */
export function checkRecordingFields(r: Record<string, unknown>): void {
  checkRecordingName(r.name);
  if (!RECORDING_FORMATS.includes(r.format as RecordingFormat)) {
    throw new InputError('format', `format must be one of ${RECORDING_FORMATS.join(', ')}, but it is ${describeValue(r.format)}.`);
  }
  wholeIn(r.byteLength, 'byteLength', 1, MAX_RECORDING_BYTES);
  if (typeof r.sha256 !== 'string' || !SHA256_HEX.test(r.sha256)) {
    throw new InputError('sha256', `sha256 must be 64 lower-case hex digits, but it is ${describeValue(r.sha256)}.`);
  }
  const geometry = checkRecordingGeometry(r.geometry);
  if (geometry.format !== r.format) {
    throw new InputError('geometry.format', `geometry.format is ${geometry.format}, but the record's format is ${String(r.format)}; they must agree.`);
  }
  checkRecordingOverrides(r.overrides, geometry.traces);
  if (typeof r.attach !== 'boolean') throw new InputError('attach', `attach must be true or false, but it is ${describeValue(r.attach)}.`);
}
