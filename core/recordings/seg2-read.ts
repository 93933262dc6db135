/**
 * Reads a SEG-2 file into a Recording. [std: Pullan, S.E., 1990,
 * Recommended standard for seismic (/radar) data files in the personal
 * computer environment, Geophysics 55(9):1260–1271; byte offsets from 0]
 *
 * - File descriptor block: 0 block id 0x3A55 (its byte order is the file's),
 *   2 revision, 4 size M of the trace-pointer table, 6 number of traces N,
 *   8 string-terminator length and characters (9–10), 11 line-terminator
 *   length and characters (12–13), 32 the N uint32 trace pointers, then
 *   strings: a uint16 offset to the next string, "KEYWORD value", the
 *   terminator; an offset of 0 ends them.
 * - Trace descriptor block: 0 id 0x4422, 2 block size X, 4 data size Y,
 *   8 samples NS, 12 data format (1 int16, 2 int32, 3 20-bit packed,
 *   4 float32, 5 float64), strings from 32; data from X.
 * - Keys read: SAMPLE_INTERVAL (s, required), DELAY (s), RECEIVER_LOCATION,
 *   SOURCE_LOCATION (1–3 numbers; offset = receiver − source along the line,
 *   or the horizontal distance when Y is given), DESCALING_FACTOR (applied
 *   to the samples), UNITS (file descriptor: METERS, FEET, INCHES,
 *   CENTIMETERS); other keys are kept out of the geometry.
 * - Format 3 packs four samples in 10 bytes: one 16-bit word of four 4-bit
 *   exponents C (first sample in the top nibble), then four 16-bit two's-
 *   complement mantissas M; value = (M / 2¹⁵) · 2^C (the SEG-D 20-bit
 *   layout, from memory of SEG-D rev 1; verify against a field file).
 *
 * Every failure is one InputError naming the byte offset or the key.
 */
import { InputError } from '../shared/errors';
import { MAX_ABS_DELAY_S, withGeometryQuestions, type Place, type Recording } from './recording';
import { listOf } from './segy-read';

export const SEG2_FILE_ID = 0x3a55;
export const SEG2_TRACE_ID = 0x4422;
/** Bytes per sample of each SEG-2 data format code (format 3: 2.5, four samples in 10 bytes). */
export const SEG2_FORMAT_BYTES: Readonly<Record<number, number>> = { 1: 2, 2: 4, 3: 2.5, 4: 4, 5: 8 };
/** Largest sample interval accepted, s (common practice: no seismograph samples slower than 1 s). */
const MAX_INTERVAL_S = 1;
/** Padded traces may take at most this many times the file's bytes as Float64 samples. */
const MAX_PAD_FACTOR = 16;
const UNIT_FACTORS: Readonly<Record<string, number>> = { METERS: 1, METRES: 1, FEET: 0.3048, INCHES: 0.0254, CENTIMETERS: 0.01, CENTIMETRES: 0.01 };

function fail(where: string, message: string): never {
  throw new InputError(where, message);
}

/** Whether the bytes start with the SEG-2 file block id in either byte order. */
export function looksLikeSeg2(bytes: Uint8Array): boolean {
  return bytes.length >= 2 && ((bytes[0] === 0x55 && bytes[1] === 0x3a) || (bytes[0] === 0x3a && bytes[1] === 0x55));
}

/** The "KEYWORD value" strings of a block, from `start` up to `limit`; keys upper-cased. */
export function readSeg2Strings(bytes: Uint8Array, view: DataView, start: number, limit: number, little: boolean, terminator: number, where: string): Map<string, string> {
  const out = new Map<string, string>();
  let q = start;
  while (q + 2 <= limit) {
    const step = view.getUint16(q, little);
    if (step === 0) break;
    if (step < 2 || q + step > limit) {
      fail(where, `The string at byte offset ${q} in the ${where} says the next one is ${step} bytes on, which runs past the block's end at byte offset ${limit}.`);
    }
    let text = '';
    for (let i = q + 2; i < q + step && bytes[i] !== terminator; i++) text += String.fromCharCode(bytes[i]);
    const trimmed = text.trim();
    if (trimmed !== '') {
      const space = trimmed.search(/\s/);
      const key = (space < 0 ? trimmed : trimmed.slice(0, space)).toUpperCase();
      const value = space < 0 ? '' : trimmed.slice(space + 1).trim();
      if (!out.has(key)) out.set(key, value);
    }
    q += step;
  }
  return out;
}

function numbersOf(value: string, key: string, where: string): number[] {
  const parts = value.split(/[\s,]+/).filter((s) => s !== '');
  const nums = parts.map(Number);
  if (parts.length === 0 || nums.some((x) => !Number.isFinite(x))) {
    fail(key, `The ${key} of ${where} is ${JSON.stringify(value.slice(0, 40))}, not a number.`);
  }
  return nums;
}

function decodeSeg2(view: DataView, at: number, code: number, little: boolean, n: number, out: Float64Array): void {
  let p = at;
  switch (code) {
    case 1:
      for (let i = 0; i < n; i++, p += 2) out[i] = view.getInt16(p, little);
      return;
    case 2:
      for (let i = 0; i < n; i++, p += 4) out[i] = view.getInt32(p, little);
      return;
    case 4:
      for (let i = 0; i < n; i++, p += 4) out[i] = view.getFloat32(p, little);
      return;
    case 5:
      for (let i = 0; i < n; i++, p += 8) out[i] = view.getFloat64(p, little);
      return;
    case 3:
      for (let i = 0; i < n; i += 4, p += 10) {
        const exponents = view.getUint16(p, little);
        for (let j = 0; j < 4 && i + j < n; j++) {
          const c = (exponents >>> (12 - 4 * j)) & 0xf;
          out[i + j] = (view.getInt16(p + 2 + 2 * j, little) / 32768) * 2 ** c;
        }
      }
      return;
  }
}

/** Bytes the samples of one trace take in a format. */
export function seg2DataBytes(code: number, samples: number): number {
  return code === 3 ? Math.ceil(samples / 4) * 10 : samples * SEG2_FORMAT_BYTES[code];
}

function location(value: string | undefined, key: string, where: string, factor: number): Place | null {
  if (value === undefined) return null;
  const n = numbersOf(value, key, where);
  return { x: n[0] * factor, y: n.length > 1 ? n[1] * factor : NaN, z: n.length > 2 ? n[2] * factor : NaN };
}

/** Reads a SEG-2 file. Throws an InputError naming the byte offset or key for a bad file. */
export function readSeg2(bytes: Uint8Array, name: string): Recording {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (bytes.length < 32) fail('file', `"${name}" is ${bytes.length} bytes long; a SEG-2 file needs at least 32 bytes for its file descriptor block.`);
  let little: boolean;
  if (view.getUint16(0, true) === SEG2_FILE_ID) little = true;
  else if (view.getUint16(0, false) === SEG2_FILE_ID) little = false;
  else fail('file descriptor', `"${name}" does not start with the SEG-2 block id 0x3A55 at byte offset 0 (it starts 0x${view.getUint16(0, false).toString(16).toUpperCase().padStart(4, '0')}).`);

  const pointerBytes = view.getUint16(4, little);
  const count = view.getUint16(6, little);
  const terminator = view.getUint8(8) >= 1 ? view.getUint8(9) : 0;
  if (count === 0) fail('file descriptor', 'The file descriptor (byte offset 6) counts 0 traces.');
  if (pointerBytes < 4 * count) {
    fail('file descriptor', `The trace-pointer table (byte offset 4) is ${pointerBytes} bytes, too small for the ${count} traces counted at byte offset 6.`);
  }
  if (32 + pointerBytes > bytes.length) {
    fail('file descriptor', `The trace-pointer table (${pointerBytes} bytes from byte offset 32) runs past the end of the file (${bytes.length} bytes).`);
  }
  const pointers: number[] = [];
  for (let k = 0; k < count; k++) {
    const ptr = view.getUint32(32 + 4 * k, little);
    if (ptr < 32 + pointerBytes || ptr + 32 > bytes.length) {
      fail(`trace pointer ${k + 1}`, `Trace pointer ${k + 1} (byte offset ${32 + 4 * k}) points to byte offset ${ptr}, outside the file's traces (${32 + pointerBytes} to ${bytes.length - 32}).`);
    }
    pointers.push(ptr);
  }
  const warnings: string[] = [];
  const fileStrings = readSeg2Strings(bytes, view, 32 + pointerBytes, Math.min(...pointers), little, terminator, 'file descriptor');
  const unitsKey = fileStrings.get('UNITS')?.toUpperCase();
  let factor = 1;
  if (unitsKey !== undefined && unitsKey in UNIT_FACTORS) factor = UNIT_FACTORS[unitsKey];

  interface Header {
    at: number;
    samples: number;
    code: number;
    data: number;
    strings: Map<string, string>;
  }
  const headers: Header[] = pointers.map((at, k) => {
    const where = `trace ${k + 1}`;
    if (view.getUint16(at, little) !== SEG2_TRACE_ID) {
      fail(where, `Trace ${k + 1}'s descriptor at byte offset ${at} does not start with the block id 0x4422.`);
    }
    const size = view.getUint16(at + 2, little);
    const dataBytes = view.getUint32(at + 4, little);
    const samples = view.getUint32(at + 8, little);
    const code = view.getUint8(at + 12);
    if (size < 32 || at + size > bytes.length) {
      fail(where, `Trace ${k + 1}'s descriptor block size (byte offset ${at + 2}) is ${size} bytes, which does not fit in the file.`);
    }
    if (!(code in SEG2_FORMAT_BYTES)) {
      fail(where, `Trace ${k + 1}'s data format code (byte offset ${at + 12}) is ${code}; SEG-2 has codes 1 to 5.`);
    }
    if (samples === 0) fail(where, `Trace ${k + 1} (byte offset ${at + 8}) has 0 samples.`);
    const need = seg2DataBytes(code, samples);
    if (need > dataBytes || at + size + need > bytes.length) {
      fail(
        where,
        `Trace ${k + 1} at byte offset ${at} needs ${need} bytes for ${samples} samples of format ${code}, but its data block holds ${Math.min(dataBytes, bytes.length - at - size)}.`,
      );
    }
    return { at, samples, code, data: at + size, strings: readSeg2Strings(bytes, view, at + 32, at + size, little, terminator, `descriptor of trace ${k + 1}`) };
  });

  let longest = 0;
  let shortest = Infinity;
  for (const h of headers) {
    longest = Math.max(longest, h.samples);
    shortest = Math.min(shortest, h.samples);
  }
  if (count * longest * 8 > MAX_PAD_FACTOR * bytes.length) {
    fail('trace lengths', `The traces hold ${shortest} to ${longest} samples; padding them to one length would need more than ${MAX_PAD_FACTOR} times the file's size.`);
  }

  let interval = NaN;
  let delay = NaN;
  let delaysDiffer = false;
  let noDelay = false;
  const traces: Float64Array[] = [];
  const offsets = new Float64Array(count).fill(NaN);
  const sources: Place[] = [];
  const receivers: Place[] = [];
  let allPlaces = true;
  const onlyReceiver: number[] = [];
  headers.forEach((h, k) => {
    const where = `trace ${k + 1}`;
    const siText = h.strings.get('SAMPLE_INTERVAL');
    if (siText === undefined) fail('SAMPLE_INTERVAL', `Trace ${k + 1}'s descriptor (byte offset ${h.at}) has no SAMPLE_INTERVAL key.`);
    const si = numbersOf(siText, 'SAMPLE_INTERVAL', where)[0];
    if (!(si > 0 && si <= MAX_INTERVAL_S)) fail('SAMPLE_INTERVAL', `The SAMPLE_INTERVAL of trace ${k + 1} is ${si} s; it must be above 0 and at most ${MAX_INTERVAL_S} s.`);
    if (k === 0) interval = si;
    else if (Math.abs(si - interval) > 1e-9 * interval) {
      fail('SAMPLE_INTERVAL', `The SAMPLE_INTERVAL of trace ${k + 1} is ${si} s, but trace 1's is ${interval} s; traces of mixed intervals are not read.`);
    }
    const delayText = h.strings.get('DELAY');
    const d = delayText === undefined ? 0 : numbersOf(delayText, 'DELAY', where)[0];
    if (delayText === undefined) noDelay = true;
    if (!(Math.abs(d) <= MAX_ABS_DELAY_S)) fail('DELAY', `The DELAY of trace ${k + 1} is ${d} s; it must lie within ±${MAX_ABS_DELAY_S} s.`);
    if (k === 0) delay = d;
    else if (d !== delay) delaysDiffer = true;
    const dfText = h.strings.get('DESCALING_FACTOR');
    const scale = dfText === undefined ? 1 : numbersOf(dfText, 'DESCALING_FACTOR', where)[0];
    const tr = new Float64Array(longest);
    decodeSeg2(view, h.data, h.code, little, h.samples, tr);
    for (let i = 0; i < h.samples; i++) {
      if (!Number.isFinite(tr[i])) {
        fail(where, `Sample ${i + 1} of trace ${k + 1} (byte offset ${h.data + i * SEG2_FORMAT_BYTES[h.code]}) is ${tr[i]}, not a finite number.`);
      }
      if (scale !== 1) tr[i] *= scale;
    }
    traces.push(tr);
    const r = location(h.strings.get('RECEIVER_LOCATION'), 'RECEIVER_LOCATION', where, factor);
    const s = location(h.strings.get('SOURCE_LOCATION'), 'SOURCE_LOCATION', where, factor);
    if (r && s) {
      offsets[k] = Number.isNaN(r.y) && Number.isNaN(s.y) ? r.x - s.x : Math.hypot(r.x - s.x, (r.y || 0) - (s.y || 0));
    } else if (r) onlyReceiver.push(k + 1);
    if (r && s) {
      receivers.push(r);
      sources.push(s);
    } else allPlaces = false;
  });

  if (noDelay) warnings.push('Some traces have no DELAY key; 0 s (recording starts at the shot) is taken for them.');
  if (delaysDiffer) warnings.push(`The traces' DELAY values differ; the first trace's ${delay} s is used for all.`);
  if (shortest < longest) warnings.push(`Trace lengths vary from ${shortest} to ${longest} samples; shorter traces are padded with zeros to ${longest}.`);
  if (onlyReceiver.length > 0) warnings.push(`Trace${onlyReceiver.length > 1 ? 's' : ''} ${listOf(onlyReceiver)} give a RECEIVER_LOCATION but no SOURCE_LOCATION, so the offset is unknown.`);
  if (unitsKey === undefined && offsets.some((o) => Number.isFinite(o))) warnings.push('The file has no UNITS key; locations are taken as metres.');
  else if (unitsKey !== undefined && !(unitsKey in UNIT_FACTORS)) warnings.push(`The UNITS key says ${JSON.stringify(unitsKey.slice(0, 20))}, which this reader does not know; locations are taken as metres.`);

  return withGeometryQuestions({
    format: 'seg2',
    name,
    ...(fileStrings.has('NOTE') ? { textHeader: fileStrings.get('NOTE') } : {}),
    sampleInterval: interval,
    samples: longest,
    delay,
    traces,
    offsets,
    component: 'unknown',
    sources: allPlaces ? sources : null,
    receivers: allPlaces ? receivers : null,
    warnings,
  });
}
