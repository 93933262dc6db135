/**
 * Reads a SEG-Y file (rev 0, rev 1 and rev 2.0) into a Recording.
 * [std: SEG Technical Standards Committee, SEG-Y rev 1 (2002) and
 * SEG-Y_r2.0 (2017); byte numbers below are the standard's, counted from 1]
 *
 * - 3200-byte textual header, EBCDIC or ASCII; extended textual headers of
 *   3200 bytes after the binary header, counted by bytes 3505–3506, or (−1)
 *   running up to the one holding the ((SEG: EndText)) stanza.
 * - 400-byte binary header: 3217 interval (µs), 3221 samples, 3225 format
 *   code, 3255 units (1 m, 2 ft), 3501 revision, 3503 fixed-length flag;
 *   rev 2: 3269 extended samples, 3273 extended interval (IEEE double, µs),
 *   3297 the byte-order integer 0x01020304, 3507 additional trace headers,
 *   3513 trace count, 3521 byte offset of the first trace, 3529 trailers.
 * - Byte order: the 0x01020304 integer when present, else the format code
 *   (bytes 3225–3226), which reads as 1–16 in one order only.
 * - Traces: 240-byte header (plus the rev 2 additional headers, skipped
 *   but for the sample count of extension 1, bytes 137–140, read when
 *   bytes 115–116 hold 0), then the samples. With the fixed-length flag 0 each trace's own sample
 *   count (115–116) sets its length; shorter traces are padded with zeros to
 *   the longest (said in a warning).
 * - Trace header: 29–30 trace id (12/15 vertical, 13 crossline, 14 inline,
 *   16 transverse, 17 radial), 37–40 offset, 71–72 coordinate scalar,
 *   73–88 source and receiver X/Y, 89–90 coordinate units, 109–110 delay
 *   (ms), 115–116 samples, 117–118 interval (µs), 215–216 time scalar.
 *   Scalars: positive multiplies, negative divides, 0 means 1.
 *
 * Every failure is one InputError naming the byte offset (counted from 0,
 * as an editor shows it) or the header bytes; nothing is allocated beyond
 * the samples the file really holds (padding is capped, see MAX_PAD_FACTOR).
 */
import { InputError } from '../shared/errors';
import { blockContains, textHeaderLines } from './ebcdic';
import { MAX_ABS_DELAY_S, withGeometryQuestions, type Component, type Place, type Recording } from './recording';
import { decodeSamples, isSegyFormatCode, SEGY_FORMATS, type SegyFormatCode } from './segy-formats';

export const TEXT_HEADER_BYTES = 3200;
export const BINARY_HEADER_BYTES = 400;
export const TRACE_HEADER_BYTES = 240;
/** Where the traces start when no extended textual header is present. */
export const FIRST_TRACE_BYTE = TEXT_HEADER_BYTES + BINARY_HEADER_BYTES;
/** The rev 2 byte-order integer (binary header bytes 3297–3300). */
export const BYTE_ORDER_MARK = 0x01020304;
/** The stanza that closes a variable run of extended textual headers (rev 1 §5.1). */
export const END_TEXT_STANZA = '((SEG: ENDTEXT))';

/** Largest sample interval accepted, µs (common practice: 1 s is far beyond any seismograph's). */
const MAX_INTERVAL_US = 1e6;
/** Padded traces may take at most this many times the file's bytes as Float64 samples. */
const MAX_PAD_FACTOR = 16;
/** Largest number of rev 2 additional trace headers accepted (common practice: real files use a handful). */
const MAX_EXTRA_HEADERS = 1000;
const FEET = 0.3048;
const ALLOWED_SCALARS = new Set([0, 1, 10, 100, 1000, 10000, -1, -10, -100, -1000, -10000]);

/** Rev 2 trace header extension 1, bytes 137–140: the trace's number of samples (uint32), as an offset within that header (SEG-Y_r2.0 Table 4, from memory: verify). */
export const EXT1_SAMPLES = 136;

/** Binary-header field positions as offsets from the file's start (standard byte number − 1). */
const B = {
  interval: 3216,
  samples: 3220,
  format: 3224,
  units: 3254,
  extSamples: 3268,
  extInterval: 3272,
  byteOrder: 3296,
  revision: 3500,
  fixedLength: 3502,
  extendedText: 3504,
  extraHeaders: 3506,
  traceCount: 3512,
  firstTrace: 3520,
  trailers: 3528,
} as const;

/** Trace-header field positions as offsets from the trace's start (standard byte number − 1). */
const T = {
  fieldRecord: 8,
  traceId: 28,
  offset: 36,
  receiverElevation: 40,
  sourceElevation: 44,
  elevationScalar: 68,
  coordinateScalar: 70,
  sourceX: 72,
  sourceY: 76,
  receiverX: 80,
  receiverY: 84,
  coordinateUnits: 88,
  delay: 108,
  samples: 114,
  interval: 116,
  timeScalar: 214,
} as const;

/** The component a SEG-Y trace id names (rev 1 trace header 29–30), or null for one that names none. */
export function componentOfTraceId(id: number): Component | null {
  switch (id) {
    case 12:
    case 15:
      return 'vertical';
    case 13:
      return 'crossline';
    case 14:
    case 17:
      return 'inline';
    case 16:
      return 'transverse';
    default:
      return null;
  }
}

/** The trace id that names a component (inverse of componentOfTraceId; 1 "seismic data" for unknown). */
export function traceIdOfComponent(c: Component): number {
  return { vertical: 12, crossline: 13, inline: 14, transverse: 16, unknown: 1 }[c];
}

/** A value times a SEG-Y scalar: positive multiplies, negative divides (dividing keeps −25 / 10 exact), 0 means 1. */
function scaled(value: number, raw: number): number {
  if (raw === 0) return value;
  return raw > 0 ? value * raw : value / -raw;
}

interface Layout {
  little: boolean;
  revision: number;
  code: SegyFormatCode;
  intervalUs: number;
  samples: number;
  fixed: boolean;
  firstTrace: number;
  end: number;
  traceCount: number;
  extraHeaders: number;
  lengthFactor: number;
  warnings: string[];
}

function fail(where: string, message: string): never {
  throw new InputError(where, message);
}

/** Whether the bytes look like a SEG-Y file: long enough, and a known format code in one byte order. */
export function looksLikeSegy(bytes: Uint8Array): boolean {
  if (bytes.length < FIRST_TRACE_BYTE) return false;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  return isSegyFormatCode(view.getInt16(B.format, false)) || isSegyFormatCode(view.getInt16(B.format, true));
}

function byteOrder(view: DataView, warnings: string[]): boolean {
  const mark = view.getUint32(B.byteOrder, false);
  if (mark === BYTE_ORDER_MARK) return false;
  if (mark === 0x04030201) return true;
  const big = view.getInt16(B.format, false);
  const little = view.getInt16(B.format, true);
  if (isSegyFormatCode(big)) return false;
  if (isSegyFormatCode(little)) {
    if (mark === 0) warnings.push('The file is little-endian (told by its format code; it carries no byte-order integer).');
    return true;
  }
  if (big === 4 || little === 4) {
    fail('binary header bytes 3225–3226', 'The sample format code is 4 (fixed point with gain), which SEG-Y rev 1 made obsolete; this reader does not read it.');
  }
  fail(
    'binary header bytes 3225–3226',
    `The sample format code at byte offset ${B.format} reads ${big} (big-endian) or ${little} (little-endian); neither is a SEG-Y format code (1, 2, 3, 5–12, 15, 16).`,
  );
}

function readRevision(bytes: Uint8Array, little: boolean): number {
  const major = bytes[B.revision];
  const minor = bytes[B.revision + 1];
  // A little-endian writer that stored rev 1's 16-bit 0x0100 swapped leaves the major number in the second byte.
  if (little && major === 0 && (minor === 1 || minor === 2)) return minor;
  return major;
}

function extendedTextEnd(bytes: Uint8Array, view: DataView, little: boolean, revision: number): number {
  if (revision < 1) return FIRST_TRACE_BYTE;
  const count = view.getInt16(B.extendedText, little);
  if (count === 0) return FIRST_TRACE_BYTE;
  if (count > 0) {
    const end = FIRST_TRACE_BYTE + count * TEXT_HEADER_BYTES;
    if (end > bytes.length) {
      fail(
        'binary header bytes 3505–3506',
        `The binary header counts ${count} extended textual headers (${count * TEXT_HEADER_BYTES} bytes from byte offset ${FIRST_TRACE_BYTE}), but the file ends at byte offset ${bytes.length}.`,
      );
    }
    return end;
  }
  if (count !== -1) {
    fail('binary header bytes 3505–3506', `The number of extended textual headers is ${count}; SEG-Y allows 0 or more, or −1 for a run ended by ${END_TEXT_STANZA}.`);
  }
  let p = FIRST_TRACE_BYTE;
  for (;;) {
    if (p + TEXT_HEADER_BYTES > bytes.length) {
      fail('extended textual headers', `The extended textual headers have no ${END_TEXT_STANZA} stanza before the file ends at byte offset ${bytes.length}.`);
    }
    const block = bytes.subarray(p, p + TEXT_HEADER_BYTES);
    p += TEXT_HEADER_BYTES;
    if (blockContains(block, END_TEXT_STANZA)) return p;
  }
}

function readLayout(bytes: Uint8Array, view: DataView, name: string): Layout {
  if (bytes.length < FIRST_TRACE_BYTE) {
    fail('file', `"${name}" is ${bytes.length} bytes long; a SEG-Y file needs at least ${FIRST_TRACE_BYTE} bytes for its textual and binary headers.`);
  }
  const warnings: string[] = [];
  const little = byteOrder(view, warnings);
  const rawCode = view.getInt16(B.format, little);
  if (!isSegyFormatCode(rawCode)) {
    fail(
      'binary header bytes 3225–3226',
      `The sample format code at byte offset ${B.format} is ${rawCode} (${little ? 'little' : 'big'}-endian, as the byte-order integer at byte offset ${B.byteOrder} says), not a SEG-Y format code (1, 2, 3, 5–12, 15, 16).`,
    );
  }
  const code: SegyFormatCode = rawCode;
  let revision = readRevision(bytes, little);
  if (revision > 2) {
    warnings.push(`The binary header names SEG-Y revision ${revision}, which this reader does not know; the file is read as revision 2.0.`);
    revision = 2;
  }
  let intervalUs = view.getUint16(B.interval, little);
  let samples = view.getUint16(B.samples, little);
  let firstTrace = extendedTextEnd(bytes, view, little, revision);
  let traceCount = 0;
  let extraHeaders = 0;
  let end = bytes.length;
  if (revision >= 2) {
    const extSamples = view.getInt32(B.extSamples, little);
    if (extSamples > 0) samples = extSamples;
    const extInterval = view.getFloat64(B.extInterval, little);
    if (Number.isFinite(extInterval) && extInterval > 0) intervalUs = extInterval;
    extraHeaders = view.getInt32(B.extraHeaders, little);
    if (extraHeaders < 0 || extraHeaders > MAX_EXTRA_HEADERS) {
      fail('binary header bytes 3507–3510', `The number of additional trace headers is ${extraHeaders}; it must be 0 to ${MAX_EXTRA_HEADERS}.`);
    }
    const count = view.getBigUint64(B.traceCount, little);
    if (count > BigInt(bytes.length)) {
      fail('binary header bytes 3513–3520', `The binary header counts ${count} traces, more than the file's ${bytes.length} bytes can hold.`);
    }
    traceCount = Number(count);
    const first = view.getBigUint64(B.firstTrace, little);
    if (first !== 0n) {
      if (first < BigInt(FIRST_TRACE_BYTE) || first > BigInt(bytes.length)) {
        fail('binary header bytes 3521–3528', `The first trace is said to start at byte offset ${first}, outside the file (${FIRST_TRACE_BYTE} to ${bytes.length}).`);
      }
      firstTrace = Number(first);
    }
    const trailers = view.getInt32(B.trailers, little);
    if (trailers < 0 || firstTrace + trailers * TEXT_HEADER_BYTES > bytes.length) {
      fail('binary header bytes 3529–3532', `The binary header counts ${trailers} trailer records of ${TEXT_HEADER_BYTES} bytes, which do not fit in the file.`);
    }
    end = bytes.length - trailers * TEXT_HEADER_BYTES;
  }
  const fixed = revision < 1 || view.getInt16(B.fixedLength, little) !== 0;
  const units = view.getInt16(B.units, little);
  const lengthFactor = units === 2 ? FEET : 1;
  if (units !== 1 && units !== 2) {
    warnings.push(`The binary header does not say whether lengths are in metres or feet (bytes 3255–3256 hold ${units}); metres are assumed.`);
  }
  if (!(intervalUs <= MAX_INTERVAL_US)) {
    fail('binary header bytes 3217–3218', `The sample interval is ${intervalUs} µs; it must be at most ${MAX_INTERVAL_US} µs.`);
  }
  return { little, revision, code, intervalUs, samples, fixed, firstTrace, end, traceCount, extraHeaders, lengthFactor, warnings };
}

interface TraceSpan {
  start: number;
  samples: number;
}

/** First pass over the trace headers: where each trace's samples start and how many there are. */
function traceSpans(view: DataView, L: Layout): TraceSpan[] {
  const size = SEGY_FORMATS[L.code].bytes;
  const headerBytes = TRACE_HEADER_BYTES * (1 + L.extraHeaders);
  const spans: TraceSpan[] = [];
  let p = L.firstTrace;
  while (p < L.end && (L.traceCount === 0 || spans.length < L.traceCount)) {
    const k = spans.length + 1;
    if (p + TRACE_HEADER_BYTES > L.end) {
      fail(`trace ${k}`, `The file ends inside the header of trace ${k}, which starts at byte offset ${p} (${L.end - p} of ${TRACE_HEADER_BYTES} bytes present).`);
    }
    // Fixed length: the binary header's count, else this trace's; variable length: this trace's, else the binary header's.
    let own = view.getUint16(p + T.samples, L.little);
    // Rev 2: a trace longer than 65535 samples gives its count in bytes 137–140 of trace header extension 1.
    if (own === 0 && L.extraHeaders > 0 && p + 2 * TRACE_HEADER_BYTES <= L.end) own = view.getUint32(p + TRACE_HEADER_BYTES + EXT1_SAMPLES, L.little);
    const n = L.fixed ? L.samples || own : own || L.samples;
    if (n === 0) {
      fail(`trace ${k}`, `Trace ${k} (byte offset ${p}) has 0 samples in both the binary header (bytes 3221–3222) and its own header (bytes 115–116).`);
    }
    const need = headerBytes + n * size;
    if (p + need > L.end) {
      fail(
        `trace ${k}`,
        `Trace ${k} at byte offset ${p} needs ${need} bytes (headers and ${n} samples of ${SEGY_FORMATS[L.code].name}), but only ${L.end - p} bytes remain in the file.`,
      );
    }
    spans.push({ start: p, samples: n });
    p += need;
  }
  if (spans.length === 0) fail('traces', 'The file holds no traces after its headers.');
  if (L.traceCount > 0 && spans.length < L.traceCount) {
    fail('binary header bytes 3513–3520', `The binary header counts ${L.traceCount} traces, but the file holds ${spans.length}.`);
  }
  if (p < L.end) L.warnings.push(`${L.end - p} bytes after the last trace (byte offset ${p}) are not read.`);
  return spans;
}

function place(x: number, y: number, z: number): Place {
  return { x, y, z };
}

/** Reads a SEG-Y file. Throws an InputError naming the byte offset or header bytes for a bad file. */
export function readSegy(bytes: Uint8Array, name: string): Recording {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const L = readLayout(bytes, view, name);
  const { little, code, warnings } = L;
  const spans = traceSpans(view, L);
  const first = spans[0].start;

  let intervalUs = L.intervalUs;
  const traceInterval = view.getUint16(first + T.interval, little);
  if (intervalUs === 0) intervalUs = traceInterval;
  if (intervalUs === 0) {
    fail('binary header bytes 3217–3218', 'The sample interval is 0 in the binary header (bytes 3217–3218) and in the first trace header (bytes 117–118).');
  }

  let longest = 0;
  let shortest = Infinity;
  for (const s of spans) {
    longest = Math.max(longest, s.samples);
    shortest = Math.min(shortest, s.samples);
  }
  if (spans.length * longest * 8 > MAX_PAD_FACTOR * bytes.length) {
    fail('trace lengths', `The traces hold ${shortest} to ${longest} samples; padding them to one length would need more than ${MAX_PAD_FACTOR} times the file's size.`);
  }

  const n = spans.length;
  const traces: Float64Array[] = new Array(n);
  const offsets = new Float64Array(n);
  const sources: Place[] = new Array(n);
  const receivers: Place[] = new Array(n);
  const components = new Set<Component>();
  const notSeismic: number[] = [];
  const fieldRecords = new Set<number>();
  let delay = NaN;
  let delaysDiffer = false;
  let coordinatesUsable = true;
  let anyCoordinate = false;
  let badScalar = '';

  for (let k = 0; k < n; k++) {
    const { start, samples } = spans[k];
    const tr = new Float64Array(longest);
    const dataStart = start + TRACE_HEADER_BYTES * (1 + L.extraHeaders);
    const bad = decodeSamples(view, dataStart, code, little, samples === longest ? tr : tr.subarray(0, samples));
    if (bad >= 0) {
      const at = dataStart + bad * SEGY_FORMATS[code].bytes;
      fail(`trace ${k + 1}`, `Sample ${bad + 1} of trace ${k + 1} (byte offset ${at}) is ${tr[bad]}, not a finite number.`);
    }
    traces[k] = tr;

    if (!L.fixed) {
      const ti = view.getUint16(start + T.interval, little);
      if (ti !== 0 && Math.abs(ti - intervalUs) > 0.5) {
        fail(`trace ${k + 1}`, `Trace ${k + 1} (byte offset ${start}) has a sample interval of ${ti} µs, but the file's is ${intervalUs} µs; traces of mixed intervals are not read.`);
      }
    }

    let timeScalar = L.revision >= 1 ? view.getInt16(start + T.timeScalar, little) : 1;
    if (!ALLOWED_SCALARS.has(timeScalar)) {
      badScalar ||= `Trace ${k + 1}'s time scalar (bytes 215–216) is ${timeScalar}, not one SEG-Y allows; 1 is used.`;
      timeScalar = 1;
    }
    const d = scaled(view.getInt16(start + T.delay, little), timeScalar) / 1000;
    if (k === 0) delay = d;
    else if (d !== delay) delaysDiffer = true;

    fieldRecords.add(view.getInt32(start + T.fieldRecord, little));
    const id = view.getInt16(start + T.traceId, little);
    const c = componentOfTraceId(id);
    if (c) components.add(c);
    else if (id !== 0 && id !== 1) notSeismic.push(k + 1);

    offsets[k] = view.getInt32(start + T.offset, little) * L.lengthFactor;

    let coordScalar = view.getInt16(start + T.coordinateScalar, little);
    if (!ALLOWED_SCALARS.has(coordScalar)) {
      badScalar ||= `Trace ${k + 1}'s coordinate scalar (bytes 71–72) is ${coordScalar}, not one SEG-Y allows; 1 is used.`;
      coordScalar = 1;
    }
    let elevScalar = view.getInt16(start + T.elevationScalar, little);
    if (!ALLOWED_SCALARS.has(elevScalar)) elevScalar = 1;
    const cf = (v: number) => scaled(v, coordScalar) * L.lengthFactor;
    const ef = (v: number) => scaled(v, elevScalar) * L.lengthFactor;
    const units = view.getInt16(start + T.coordinateUnits, little);
    if (units > 1) coordinatesUsable = false;
    const sx = view.getInt32(start + T.sourceX, little);
    const sy = view.getInt32(start + T.sourceY, little);
    const rx = view.getInt32(start + T.receiverX, little);
    const ry = view.getInt32(start + T.receiverY, little);
    if (sx !== 0 || sy !== 0 || rx !== 0 || ry !== 0) anyCoordinate = true;
    sources[k] = place(cf(sx), cf(sy), ef(view.getInt32(start + T.sourceElevation, little)));
    receivers[k] = place(cf(rx), cf(ry), ef(view.getInt32(start + T.receiverElevation, little)));
  }

  if (!(Math.abs(delay) <= MAX_ABS_DELAY_S)) {
    fail('trace header bytes 109–110', `The first trace's delay is ${delay} s; it must lie within ±${MAX_ABS_DELAY_S} s.`);
  }
  if (badScalar) warnings.push(badScalar);
  if (delaysDiffer) warnings.push(`The traces' delays differ (bytes 109–110); the first trace's ${delay} s is used for all.`);
  if (shortest < longest) warnings.push(`Trace lengths vary from ${shortest} to ${longest} samples; shorter traces are padded with zeros to ${longest}.`);
  if (fieldRecords.size > 1) {
    warnings.push(`The file holds ${fieldRecords.size} field records (trace bytes 9–12); all ${n} traces are read as one gather.`);
  }
  if (notSeismic.length > 0) {
    warnings.push(`Trace${notSeismic.length > 1 ? 's' : ''} ${listOf(notSeismic)} ${notSeismic.length > 1 ? 'are' : 'is'} not marked as seismic data (trace id, bytes 29–30); check before use.`);
  }

  let component: Component = 'unknown';
  if (components.size === 1) component = [...components][0];
  else if (components.size > 1) warnings.push(`The traces name different components (${[...components].join(', ')}); none is taken.`);

  const hasCoordinates = anyCoordinate && coordinatesUsable;
  if (anyCoordinate && !coordinatesUsable) warnings.push('The coordinates are angles, not lengths (bytes 89–90); they are not used.');
  if (offsets.every((o) => o === 0)) {
    if (hasCoordinates && offsets.length > 0) {
      for (let k = 0; k < n; k++) offsets[k] = Math.hypot(receivers[k].x - sources[k].x, receivers[k].y - sources[k].y);
      warnings.push('The offsets (bytes 37–40) are all 0; they are computed from the source and receiver coordinates instead.');
    } else {
      offsets.fill(NaN);
    }
  }

  const textHeader = textHeaderLines(bytes.subarray(0, TEXT_HEADER_BYTES));
  return withGeometryQuestions({
    format: 'segy',
    textHeader,
    name,
    sampleInterval: intervalUs / 1e6,
    samples: longest,
    delay,
    traces,
    offsets,
    component,
    sources: hasCoordinates ? sources : null,
    receivers: hasCoordinates ? receivers : null,
    warnings,
  });
}

/** "1, 2 and 5" (the first ten, then "and N more"). */
export function listOf(items: number[]): string {
  if (items.length > 10) return `${items.slice(0, 10).join(', ')} and ${items.length - 10} more`;
  if (items.length === 1) return String(items[0]);
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}
