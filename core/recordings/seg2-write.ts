/**
 * Writes a SEG-2 file byte by byte from Pullan (1990)'s layout (see
 * seg2-read.ts for the byte offsets). Used for the app's invented demo
 * records and the tests' files. Pure: returns the bytes.
 *
 * Each trace descriptor carries SAMPLE_INTERVAL, DELAY, CHANNEL_NUMBER,
 * RECEIVER_LOCATION and SOURCE_LOCATION (the source at 0, the receiver at
 * the trace's offset, when offsets are given) and DESCALING_FACTOR; the file
 * descriptor carries UNITS METERS and a NOTE saying the record is invented.
 */
import { InputError } from '../shared/errors';
import { SEG2_FILE_ID, SEG2_TRACE_ID, seg2DataBytes } from './seg2-read';

export type Seg2FormatCode = 1 | 2 | 3 | 4 | 5;

export interface Seg2Input {
  /** s */
  sampleInterval: number;
  /** Time of the first sample after the source fired, s. */
  delay: number;
  traces: ArrayLike<number>[];
  /** Offset per trace, m; omitted: no locations are written. */
  offsets?: ArrayLike<number>;
}

export interface Seg2WriteOptions {
  /** Data format code: 1 int16, 2 int32, 3 20-bit packed, 4 float32, 5 float64. @default 4 */
  format?: Seg2FormatCode;
  /** Little-endian (the usual order of PC seismographs) or big-endian. @default true */
  littleEndian?: boolean;
  /** DESCALING_FACTOR written in every trace; samples are stored divided by it. @default 1 */
  descalingFactor?: number;
  /** Extra "KEYWORD value" strings for the file descriptor. */
  fileStrings?: string[];
  /** Extra strings for trace k's descriptor. */
  traceStrings?: (trace: number) => string[];
  /** Leave the DELAY key out (to test files that omit it). @default false */
  omitDelay?: boolean;
}

const NOTE = 'NOTE Synthetic record written by Shearfield (invented data, not a field recording).';

function stringsBlock(strings: string[]): Uint8Array {
  const parts = strings.map((s) => {
    const len = 2 + s.length + 1;
    const b = new Uint8Array(len);
    for (let i = 0; i < s.length; i++) b[2 + i] = s.charCodeAt(i) & 0xff;
    return b;
  });
  const total = parts.reduce((a, b) => a + b.length, 0) + 2;
  const out = new Uint8Array(Math.ceil(total / 4) * 4);
  let p = 0;
  for (const b of parts) {
    out.set(b, p);
    p += b.length;
  }
  return out;
}

function setStringSteps(view: DataView, at: number, strings: string[], little: boolean): void {
  let p = at;
  for (const s of strings) {
    const len = 2 + s.length + 1;
    view.setUint16(p, len, little);
    p += len;
  }
}

/** The four 4-bit exponents and int16 mantissas of format 3 for one value (value = M/2¹⁵ · 2^C). */
function pack20(x: number): { c: number; m: number } {
  for (let c = 0; c < 16; c++) {
    const m = Math.round((x / 2 ** c) * 32768);
    if (m >= -32768 && m <= 32767) return { c, m };
  }
  throw new InputError('traces', `The value ${x} is too large for SEG-2 format 3 (at most 32767/32768 · 2^15).`);
}

function encode(view: DataView, at: number, code: Seg2FormatCode, little: boolean, values: ArrayLike<number>, scale: number): void {
  const n = values.length;
  let p = at;
  if (code === 3) {
    for (let i = 0; i < n; i += 4, p += 10) {
      let exponents = 0;
      for (let j = 0; j < 4; j++) {
        const { c, m } = i + j < n ? pack20(values[i + j] / scale) : { c: 0, m: 0 };
        exponents |= c << (12 - 4 * j);
        view.setInt16(p + 2 + 2 * j, m, little);
      }
      view.setUint16(p, exponents, little);
    }
    return;
  }
  for (let i = 0; i < n; i++) {
    const x = values[i] / scale;
    if (code === 1) view.setInt16(p, Math.round(x), little), (p += 2);
    else if (code === 2) view.setInt32(p, Math.round(x), little), (p += 4);
    else if (code === 4) view.setFloat32(p, x, little), (p += 4);
    else view.setFloat64(p, x, little), (p += 8);
  }
}

/** Writes a SEG-2 file. Throws an InputError naming the field for input the format cannot hold. */
export function writeSeg2(input: Seg2Input, options: Seg2WriteOptions = {}): Uint8Array {
  const format = options.format ?? 4;
  const little = options.littleEndian ?? true;
  const scale = options.descalingFactor ?? 1;
  const n = input.traces.length;
  if (n === 0 || n > 0xffff) throw new InputError('traces', `A SEG-2 file holds 1 to 65535 traces, but ${n} were given.`);
  if (!(input.sampleInterval > 0)) throw new InputError('sampleInterval', `The sample interval must be above 0 s, but it is ${input.sampleInterval}.`);
  if (![1, 2, 3, 4, 5].includes(format)) throw new InputError('format', `SEG-2 data format ${String(format)} does not exist (1 to 5).`);
  if (!(scale > 0) || !Number.isFinite(scale)) throw new InputError('descalingFactor', `The descaling factor must be above 0, but it is ${scale}.`);
  const [low, high] = format === 1 ? [-32768, 32767] : format === 2 ? [-2147483648, 2147483647] : [-Infinity, Infinity];
  input.traces.forEach((t, k) => {
    if (t.length === 0) throw new InputError(`traces[${k}]`, `Trace ${k + 1} has no samples.`);
    for (let i = 0; i < t.length; i++) {
      const x = Math.round(t[i] / scale);
      if (!Number.isFinite(t[i]) || (format <= 2 && (x < low || x > high))) {
        throw new InputError(`traces[${k}][${i}]`, `Sample ${i + 1} of trace ${k + 1} (${t[i]}) does not fit SEG-2 format ${format} with descaling factor ${scale}.`);
      }
    }
  });

  const fileStrings = ['UNITS METERS', NOTE, ...(options.fileStrings ?? [])];
  const fileBlock = stringsBlock(fileStrings);
  const pointerBytes = 4 * n;
  const traceStrings = input.traces.map((_, k) => {
    const s = [`SAMPLE_INTERVAL ${input.sampleInterval}`, `CHANNEL_NUMBER ${k + 1}`, `DESCALING_FACTOR ${scale}`];
    if (!options.omitDelay) s.push(`DELAY ${input.delay}`);
    const off = input.offsets?.[k];
    if (off !== undefined && Number.isFinite(off)) s.push('SOURCE_LOCATION 0', `RECEIVER_LOCATION ${off}`);
    return [...s, ...(options.traceStrings?.(k) ?? [])];
  });
  const traceBlocks = traceStrings.map(stringsBlock);
  let total = 32 + pointerBytes + fileBlock.length;
  const starts: number[] = [];
  input.traces.forEach((t, k) => {
    starts.push(total);
    total += 32 + traceBlocks[k].length + seg2DataBytes(format, t.length);
  });
  const bytes = new Uint8Array(total);
  const view = new DataView(bytes.buffer);
  view.setUint16(0, SEG2_FILE_ID, little);
  view.setUint16(2, 1, little);
  view.setUint16(4, pointerBytes, little);
  view.setUint16(6, n, little);
  view.setUint8(8, 1);
  view.setUint8(9, 0);
  view.setUint8(11, 1);
  view.setUint8(12, 0x0a);
  starts.forEach((s, k) => view.setUint32(32 + 4 * k, s, little));
  bytes.set(fileBlock, 32 + pointerBytes);
  setStringSteps(view, 32 + pointerBytes, fileStrings, little);
  input.traces.forEach((t, k) => {
    const at = starts[k];
    const size = 32 + traceBlocks[k].length;
    if (size > 0xffff) throw new InputError(`traces[${k}]`, `The strings of trace ${k + 1} take ${size} bytes; a SEG-2 trace descriptor holds at most 65535.`);
    const dataBytes = seg2DataBytes(format, t.length);
    view.setUint16(at, SEG2_TRACE_ID, little);
    view.setUint16(at + 2, size, little);
    view.setUint32(at + 4, dataBytes, little);
    view.setUint32(at + 8, t.length, little);
    view.setUint8(at + 12, format);
    bytes.set(traceBlocks[k], at + 32);
    setStringSteps(view, at + 32, traceStrings[k], little);
    encode(view, at + size, format, little, t, scale);
  });
  return bytes;
}
