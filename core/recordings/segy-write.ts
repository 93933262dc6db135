/**
 * Writes a SEG-Y file byte by byte from the standard's layout (rev 0, rev 1
 * or rev 2.0; see segy-read.ts for the byte positions). Used for the app's
 * invented demo records, for the tests' files, and for exports of
 * synthetic gathers. Pure: returns the bytes.
 *
 * Lengths are written in whole metres (trace bytes 37–40 hold integers);
 * coordinates use the coordinate scalar −100 (centimetres); the delay uses
 * the smallest time scalar that holds it exactly to 0.1 µs.
 */
import { InputError } from '../shared/errors';
import { asciiFromText, ebcdicFromText } from './ebcdic';
import { IBM_MAX } from './ibm-float';
import type { Component, Place } from './recording';
import { encodeSamples, integerRange, SEGY_FORMATS, type SegyFormatCode } from './segy-formats';
import {
  BYTE_ORDER_MARK,
  END_TEXT_STANZA,
  EXT1_SAMPLES,
  FIRST_TRACE_BYTE,
  TEXT_HEADER_BYTES,
  TRACE_HEADER_BYTES,
  traceIdOfComponent,
} from './segy-read';

/** What is written: the Recording's own fields, in SI units. */
export interface SegyInput {
  /** s */
  sampleInterval: number;
  /** Time of the first sample after the source fired, s. */
  delay: number;
  /** One array of samples per trace (lengths may differ only with `variableLengths`). */
  traces: ArrayLike<number>[];
  /** Offset per trace, m (whole metres); omitted or NaN: 0, "not recorded". */
  offsets?: ArrayLike<number>;
  component?: Component;
  sources?: Place[];
  receivers?: Place[];
}

export interface SegyWriteOptions {
  /** Sample format code. @default 5 (IEEE float32) */
  format?: SegyFormatCode;
  /** Little-endian instead of the standard's big-endian. @default false */
  littleEndian?: boolean;
  /** SEG-Y revision: 0, 1 or 2 (2.0). @default 1 */
  revision?: 0 | 1 | 2;
  /** Encoding of the textual headers. @default 'ebcdic' */
  textEncoding?: 'ebcdic' | 'ascii';
  /** Lines of the textual header (up to 40, each cut to 76 characters after the "Cnn " prefix). */
  textLines?: string[];
  /** Extended textual headers, one string (≤ 3200 characters) each. */
  extendedHeaders?: string[];
  /** 'count' writes their number in 3505–3506; 'variable' writes −1 and an EndText stanza. @default 'count' */
  extendedForm?: 'count' | 'variable';
  /** Fixed-length flag 0: each trace keeps its own length (bytes 115–116). @default false */
  variableLengths?: boolean;
  /** Rev 2 additional 240-byte trace headers per trace. @default 0 */
  extraTraceHeaders?: number;
  /** Write the rev 2 byte-order integer 0x01020304. @default true for revision 2 */
  byteOrderMark?: boolean;
  /** Length unit of the binary header (3255–3256): 1 m, 2 ft. @default 1 */
  lengthUnit?: 1 | 2;
  /** Per-trace header changes after the standard fields are written (for tests of odd files). */
  patchTraceHeader?: (trace: number, header: DataView) => void;
  /** Binary header changes after the standard fields are written (for tests of odd files). */
  patchBinaryHeader?: (header: DataView) => void;
}

const DEFAULT_LINES = ['Synthetic record by Shearfield: invented data, not a field recording.'];

function textBlock(text: string, encoding: 'ebcdic' | 'ascii'): Uint8Array {
  const padded = text.padEnd(TEXT_HEADER_BYTES, ' ').slice(0, TEXT_HEADER_BYTES);
  return encoding === 'ebcdic' ? ebcdicFromText(padded) : asciiFromText(padded);
}

/** The 3200-character textual header: 40 lines "C 1 …" to "C40 …", line 39 naming the revision. */
export function textualHeader(lines: string[], revision: 0 | 1 | 2): string {
  let out = '';
  for (let i = 1; i <= 40; i++) {
    let body = lines[i - 1] ?? '';
    if (i === 39 && revision === 1) body = 'SEG Y REV1';
    if (i === 39 && revision === 2) body = 'SEG-Y_REV2.0';
    if (i === 40 && revision > 0) body = 'END TEXTUAL HEADER';
    out += `C${String(i).padStart(2, ' ')} ${body}`.slice(0, 80).padEnd(80, ' ');
  }
  return out;
}

/** The smallest SEG-Y time scalar (1, −10, …, −10000) holding `ms` exactly to 0.1 µs, with the integer to write. */
function delayWords(ms: number, revision: number): { value: number; scalar: number } {
  const divisors = revision >= 1 ? [1, 10, 100, 1000, 10000] : [1];
  for (const d of divisors) {
    const v = ms * d;
    if (Math.abs(v - Math.round(v)) < 1e-4 * d && Math.abs(Math.round(v)) <= 0x7fff) return { value: Math.round(v), scalar: d === 1 ? 1 : -d };
  }
  throw new InputError('delay', `The delay of ${ms / 1000} s cannot be written in SEG-Y bytes 109–110 (whole ms up to 32.767 s, or finer with the time scalar).`);
}

function checkInput(input: SegyInput, o: Required<Pick<SegyWriteOptions, 'format' | 'revision' | 'variableLengths' | 'extraTraceHeaders'>>): number {
  const { format, revision } = o;
  if (!(format in SEGY_FORMATS)) throw new InputError('format', `Sample format code ${String(format)} is not one this writer knows.`);
  if (revision < 2 && ![1, 2, 3, 5, 8].includes(format)) {
    throw new InputError('format', `Sample format code ${format} needs SEG-Y revision 2; revision ${revision} has only 1, 2, 3, 5 and 8.`);
  }
  if (input.traces.length === 0) throw new InputError('traces', 'A SEG-Y file needs at least one trace.');
  const us = input.sampleInterval * 1e6;
  if (!(us > 0) || !Number.isFinite(us)) throw new InputError('sampleInterval', `The sample interval must be above 0 s, but it is ${input.sampleInterval}.`);
  if (revision < 2 && (Math.abs(us - Math.round(us)) > 1e-6 || Math.round(us) > 0xffff)) {
    throw new InputError('sampleInterval', `A sample interval of ${us} µs needs SEG-Y revision 2 (bytes 3217–3218 hold whole µs up to 65535).`);
  }
  const n0 = input.traces[0].length;
  const range = integerRange(format);
  input.traces.forEach((t, k) => {
    if (t.length === 0) throw new InputError(`traces[${k}]`, `Trace ${k + 1} has no samples.`);
    if (!o.variableLengths && t.length !== n0) {
      throw new InputError(`traces[${k}]`, `Trace ${k + 1} has ${t.length} samples but trace 1 has ${n0}; set variableLengths to write traces of different lengths.`);
    }
    if (t.length > 0xffff && revision < 2) throw new InputError(`traces[${k}]`, `Trace ${k + 1} has ${t.length} samples; more than 65535 need SEG-Y revision 2.`);
    for (let i = 0; i < t.length; i++) {
      const x = t[i];
      const ok = range ? Number.isFinite(x) && Math.round(x) >= range[0] && Math.round(x) <= range[1] : format === 1 ? Math.abs(x) <= IBM_MAX : Number.isFinite(x);
      if (!ok) throw new InputError(`traces[${k}][${i}]`, `Sample ${i + 1} of trace ${k + 1} (${x}) does not fit format ${format} (${SEGY_FORMATS[format].name}).`);
    }
  });
  const off = input.offsets;
  if (off) {
    if (off.length !== input.traces.length) throw new InputError('offsets', `There are ${off.length} offsets for ${input.traces.length} traces.`);
    for (let k = 0; k < off.length; k++) {
      if (!Number.isNaN(off[k]) && (!Number.isInteger(off[k]) || Math.abs(off[k]) > 0x7fffffff)) {
        throw new InputError(`offsets[${k}]`, `Offset ${off[k]} m of trace ${k + 1} is not a whole number of metres, which SEG-Y bytes 37–40 need.`);
      }
    }
  }
  return n0;
}

/** Writes a SEG-Y file. Throws an InputError naming the field for input the format cannot hold. */
export function writeSegy(input: SegyInput, options: SegyWriteOptions = {}): Uint8Array {
  const format = options.format ?? 5;
  const revision = options.revision ?? 1;
  const little = options.littleEndian ?? false;
  const encoding = options.textEncoding ?? 'ebcdic';
  const variableLengths = options.variableLengths ?? false;
  const extraTraceHeaders = options.extraTraceHeaders ?? 0;
  const extended = options.extendedHeaders ?? [];
  const form = options.extendedForm ?? 'count';
  const n0 = checkInput(input, { format, revision, variableLengths, extraTraceHeaders });
  if (extraTraceHeaders > 0 && revision < 2) throw new InputError('extraTraceHeaders', 'Additional trace headers need SEG-Y revision 2.');
  if (extended.length > 0 && revision < 1) throw new InputError('extendedHeaders', 'Extended textual headers need SEG-Y revision 1 or 2.');

  if (form === 'variable' && revision < 1) throw new InputError('extendedForm', 'The variable form of extended textual headers needs SEG-Y revision 1 or 2.');
  const blocks = form === 'variable' ? [...extended, END_TEXT_STANZA] : [...extended];
  const size = SEGY_FORMATS[format].bytes;
  const headerBytes = TRACE_HEADER_BYTES * (1 + extraTraceHeaders);
  const firstTrace = FIRST_TRACE_BYTE + blocks.length * TEXT_HEADER_BYTES;
  let total = firstTrace;
  for (const t of input.traces) total += headerBytes + t.length * size;
  const bytes = new Uint8Array(total);
  const view = new DataView(bytes.buffer);

  bytes.set(textBlock(textualHeader(options.textLines ?? DEFAULT_LINES, revision), encoding), 0);
  blocks.forEach((b, i) => bytes.set(textBlock(b, encoding), FIRST_TRACE_BYTE + i * TEXT_HEADER_BYTES));

  const us = input.sampleInterval * 1e6;
  const usWord = Math.abs(us - Math.round(us)) < 1e-6 && us <= 0xffff ? Math.round(us) : 0;
  view.setInt16(3212, input.traces.length, little);
  view.setUint16(3216, usWord, little);
  view.setUint16(3218, usWord, little);
  view.setUint16(3220, n0 <= 0xffff ? n0 : 0, little);
  view.setUint16(3222, n0 <= 0xffff ? n0 : 0, little);
  view.setInt16(3224, format, little);
  view.setInt16(3228, 1, little); // sorting: as recorded
  view.setInt16(3254, options.lengthUnit ?? 1, little);
  if (revision >= 1) {
    view.setUint8(3500, revision);
    view.setUint8(3501, 0);
    view.setInt16(3502, variableLengths ? 0 : 1, little);
    view.setInt16(3504, form === 'variable' && blocks.length > 0 ? -1 : blocks.length, little);
  }
  if (revision >= 2) {
    if (n0 > 0xffff) view.setInt32(3268, n0, little);
    if (usWord === 0) view.setFloat64(3272, us, little);
    view.setInt32(3506, extraTraceHeaders, little);
    view.setBigUint64(3512, BigInt(input.traces.length), little);
    view.setBigUint64(3520, BigInt(firstTrace), little);
  }
  if (options.byteOrderMark ?? revision >= 2) view.setUint32(3296, BYTE_ORDER_MARK, little);
  options.patchBinaryHeader?.(new DataView(bytes.buffer, TEXT_HEADER_BYTES, 400));

  const { value: delayValue, scalar: timeScalar } = delayWords(input.delay * 1000, revision);
  const traceId = traceIdOfComponent(input.component ?? 'unknown');
  let p = firstTrace;
  input.traces.forEach((t, k) => {
    view.setInt32(p, k + 1, little);
    view.setInt32(p + 4, k + 1, little);
    view.setInt32(p + 8, 1, little);
    view.setInt32(p + 12, k + 1, little);
    view.setInt16(p + 28, traceId, little);
    view.setInt16(p + 30, 1, little);
    view.setInt16(p + 32, 1, little);
    view.setInt16(p + 34, 1, little);
    const off = input.offsets?.[k];
    view.setInt32(p + 36, off === undefined || Number.isNaN(off) ? 0 : off, little);
    view.setInt16(p + 68, -100, little);
    view.setInt16(p + 70, -100, little);
    const s = input.sources?.[k];
    const r = input.receivers?.[k];
    const cm = (v: number | undefined) => (v === undefined || !Number.isFinite(v) ? 0 : Math.round(v * 100));
    if (s) {
      view.setInt32(p + 72, cm(s.x), little);
      view.setInt32(p + 76, cm(s.y), little);
      view.setInt32(p + 44, cm(s.z), little);
    }
    if (r) {
      view.setInt32(p + 80, cm(r.x), little);
      view.setInt32(p + 84, cm(r.y), little);
      view.setInt32(p + 40, cm(r.z), little);
    }
    view.setInt16(p + 88, 1, little);
    view.setInt16(p + 108, delayValue, little);
    view.setUint16(p + 114, t.length <= 0xffff ? t.length : 0, little);
    view.setUint16(p + 116, usWord, little);
    if (revision >= 1) view.setInt16(p + 214, timeScalar, little);
    if (extraTraceHeaders > 0) {
      // Trace header extension 1: the sample count (bytes 137–140) and the header name (233–240).
      view.setUint32(p + TRACE_HEADER_BYTES + EXT1_SAMPLES, t.length, little);
      bytes.set(asciiFromText('SEG00001'), p + TRACE_HEADER_BYTES + 232);
    }
    options.patchTraceHeader?.(k, new DataView(bytes.buffer, p, TRACE_HEADER_BYTES));
    encodeSamples(view, p + headerBytes, format, little, t);
    p += headerBytes + t.length * size;
  });
  return bytes;
}
