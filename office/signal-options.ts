/**
 * Options shared by `shearfield image` and `shearfield pick`: the record
 * file, its geometry overrides, the method and the image axes. Kept outside
 * office/commands/, where office/cli.ts loads every file as a command.
 */
import { readFileSync } from 'node:fs';
import { readRecording } from '../core/recordings/read';
import { InputError } from '../core/shared/errors';
import { gatherOfRecording, type Gather } from '../core/signal/gather';
import { linearAxis, type DispersionImage, type ImageMethod } from '../core/signal/image';
import { multipleFilterImage } from '../core/signal/multiple-filter';
import { DEFAULT_VELOCITY_AXIS, phaseShiftImage } from '../core/signal/phase-shift';

export const METHODS: readonly ImageMethod[] = ['multiple-filter', 'phase-shift'];

export const SIGNAL_OPTIONS = {
  method: { type: 'string' },
  trace: { type: 'string' },
  'near-trace': { type: 'string' },
  freq: { type: 'string' },
  velocity: { type: 'string' },
  offsets: { type: 'string' },
} as const;

export const SIGNAL_OPTIONS_HELP = `  --method M             multiple-filter (group velocity of one trace, Dziewonski,
                         Bloch & Landisman 1969) or phase-shift (phase velocity of
                         the whole gather, Park, Miller & Xia 1998). Required.
  --trace K              multiple-filter only: the trace to analyse, 1 = the first in
                         the file. Default: the trace farthest from the source.
  --near-trace K         multiple-filter only: a second trace nearer the source (1 = the
                         first in the file). The image is then of the pair: the delay
                         between the two receivers over their distance apart, so an
                         error in the record's trigger time cancels. Default: one trace,
                         timed from the source.
  --freq FROM:TO:COUNT   Frequencies (rows), Hz, evenly spaced. Default: from
                         max(2 Hz, 4 / record length) to min(0.4 / sample interval,
                         100 Hz), 100 rows. Phase-shift rows use the spectral line
                         nearest each frequency and report that line's frequency.
  --velocity FROM:TO:COUNT
                         Velocities (columns), m/s, evenly spaced.
                         Default: ${DEFAULT_VELOCITY_AXIS.from}:${DEFAULT_VELOCITY_AXIS.to}:${DEFAULT_VELOCITY_AXIS.count}.
  --offsets FIRST:SPACING
                         Offset of the first receiver and the receiver spacing, m,
                         in place of the file's (needed when the file has none).`;

function parseNumber(text: string, field: string, what: string): number {
  const t = text.trim();
  const v = t === '' ? NaN : Number(t);
  if (!Number.isFinite(v)) throw new InputError(field, `${field} ${what} must be a number, but it is "${t}".`);
  return v;
}

/** FROM:TO:COUNT as an evenly spaced axis; `field` is the option's name. */
export function parseAxis(text: string, field: string, unit: string): Float64Array {
  const parts = text.split(':');
  if (parts.length !== 3) throw new InputError(field, `${field} must be FROM:TO:COUNT, e.g. ${field === '--freq' ? '2:60:100' : '50:1000:200'}, but it is "${text}".`);
  return linearAxis(parseNumber(parts[0], field, 'FROM'), parseNumber(parts[1], field, 'TO'), parseNumber(parts[2], field, 'COUNT'), field, unit);
}

export interface SignalValues {
  method?: string;
  trace?: string;
  'near-trace'?: string;
  freq?: string;
  velocity?: string;
  offsets?: string;
}

/** The one record path among the positional arguments. */
export function oneRecordPath(positionals: readonly string[], example: string): string {
  if (positionals.length !== 1) {
    throw new InputError(
      'FILE',
      positionals.length === 0 ? `Give one record file (SEG-Y, SEG-2 or CSV traces), e.g. ${example}.` : `Give exactly one record file, but ${positionals.length} were given.`,
    );
  }
  return positionals[0];
}

/** Reads the record file with the --offsets override, as a gather. */
export function readGather(path: string, offsets: string | undefined): Gather {
  let bytes: Uint8Array;
  try {
    bytes = readFileSync(path);
  } catch (e) {
    const code = (e as { code?: string }).code;
    const why = code === 'ENOENT' ? 'does not exist' : code === 'EISDIR' ? 'is a folder, not a file' : `cannot be read (${code ?? 'unknown error'})`;
    throw new InputError('FILE', `The record file "${path}" ${why}.`);
  }
  let overrides = {};
  if (offsets !== undefined) {
    const parts = offsets.split(':');
    if (parts.length !== 2) throw new InputError('--offsets', `--offsets must be FIRST:SPACING in metres, e.g. 5:2, but it is "${offsets}".`);
    overrides = { offsets: { first: parseNumber(parts[0], '--offsets', 'FIRST'), spacing: parseNumber(parts[1], '--offsets', 'SPACING') } };
  }
  const name = path.split(/[\\/]/).pop() ?? path;
  const rec = readRecording(bytes, name, overrides);
  if (rec.missingGeometry) {
    throw new InputError('--offsets', `${rec.askFor[0]} Use --offsets FIRST:SPACING.`);
  }
  return gatherOfRecording(rec);
}

/** The image the options ask for. */
export function imageOf(gather: Gather, v: SignalValues): DispersionImage {
  const method = v.method;
  if (method === undefined) throw new InputError('--method', 'Give --method multiple-filter or --method phase-shift.');
  if (!METHODS.includes(method as ImageMethod)) {
    throw new InputError('--method', `--method must be multiple-filter or phase-shift, but it is "${method}".`);
  }
  const frequencies = v.freq !== undefined ? parseAxis(v.freq, '--freq', 'Hz') : undefined;
  const velocities = v.velocity !== undefined ? parseAxis(v.velocity, '--velocity', 'm/s') : undefined;
  const axes = { ...(frequencies ? { frequencies } : {}), ...(velocities ? { velocities } : {}) };
  if (method === 'phase-shift') {
    for (const o of ['trace', 'near-trace'] as const) {
      if (v[o] !== undefined) throw new InputError(`--${o}`, `--${o} applies to --method multiple-filter only; the phase-shift method uses every trace.`);
    }
    return phaseShiftImage(gather, axes);
  }
  const trace = v.trace !== undefined ? traceNumber(v.trace, '--trace', gather) : undefined;
  if (v['near-trace'] === undefined) return multipleFilterImage(gather, { ...axes, ...(trace !== undefined ? { trace } : {}) });
  // The two-receiver form (core/signal/multiple-filter.ts `reference`): the near trace must be nearer the source.
  const reference = traceNumber(v['near-trace'], '--near-trace', gather);
  const far = trace ?? farthestTrace(gather.offsets);
  const [xNear, xFar] = [Number(gather.offsets[reference]), Number(gather.offsets[far])];
  if (!(xNear < xFar)) {
    throw new InputError(
      '--near-trace',
      `--near-trace must be a trace nearer the source than the analysed trace ${far + 1} (at ${xFar} m), but trace ${reference + 1} is at ${xNear} m.`,
    );
  }
  return multipleFilterImage(gather, { ...axes, trace: far, reference });
}

/** A trace number option (1-based) as a 0-based index, within the gather. */
function traceNumber(text: string, field: '--trace' | '--near-trace', gather: Gather): number {
  const k = parseNumber(text, field, 'K');
  if (!Number.isInteger(k) || k < 1 || k > gather.traces.length) {
    throw new InputError(field, `${field} must be a trace number from 1 to ${gather.traces.length}, but it is ${k}.`);
  }
  return k - 1;
}

/** The trace farthest from the source (the first of equals), as multipleFilterImage's default. */
function farthestTrace(offsets: ArrayLike<number>): number {
  let best = 0;
  for (let j = 1; j < offsets.length; j++) if (offsets[j] > offsets[best]) best = j;
  return best;
}
