/**
 * SEG-Y data sample format codes (binary header bytes 3225–3226): the size
 * of one sample and how to turn the bytes of a trace into numbers and back.
 * [std: SEG-Y rev 1 (2002) binary header table; SEG-Y rev 2.0 (2017) adds
 * codes 6, 7, 9–12, 15 and 16.] Code 4 (fixed point with gain) is obsolete
 * since rev 1 and is refused by name.
 */
import { numberFromIbmBits, ibmBitsFromNumber } from './ibm-float';

export type SegyFormatCode = 1 | 2 | 3 | 5 | 6 | 7 | 8 | 9 | 10 | 11 | 12 | 15 | 16;

/** Bytes per sample of each supported code, and its name for messages. */
export const SEGY_FORMATS: Readonly<Record<SegyFormatCode, { bytes: number; name: string }>> = {
  1: { bytes: 4, name: 'IBM float32' },
  2: { bytes: 4, name: 'int32' },
  3: { bytes: 2, name: 'int16' },
  5: { bytes: 4, name: 'IEEE float32' },
  6: { bytes: 8, name: 'IEEE float64' },
  7: { bytes: 3, name: 'int24' },
  8: { bytes: 1, name: 'int8' },
  9: { bytes: 8, name: 'int64' },
  10: { bytes: 4, name: 'uint32' },
  11: { bytes: 2, name: 'uint16' },
  12: { bytes: 8, name: 'uint64' },
  15: { bytes: 3, name: 'uint24' },
  16: { bytes: 1, name: 'uint8' },
};

export const SEGY_FORMAT_CODES: readonly SegyFormatCode[] = [1, 2, 3, 5, 6, 7, 8, 9, 10, 11, 12, 15, 16];

export function isSegyFormatCode(code: number): code is SegyFormatCode {
  return Object.prototype.hasOwnProperty.call(SEGY_FORMATS, code);
}

/**
 * Decodes `out.length` samples of format `code` starting at byte `start`
 * of `view` (the caller has checked that they fit). Returns the index of
 * the first IEEE value that is not finite (NaN or ±Infinity), for the
 * caller to report, or −1; the other codes cannot hold one.
 */
export function decodeSamples(view: DataView, start: number, code: SegyFormatCode, little: boolean, out: Float64Array): number {
  const n = out.length;
  let p = start;
  switch (code) {
    case 1:
      for (let i = 0; i < n; i++, p += 4) out[i] = numberFromIbmBits(view.getUint32(p, little));
      return -1;
    case 2:
      for (let i = 0; i < n; i++, p += 4) out[i] = view.getInt32(p, little);
      return -1;
    case 3:
      for (let i = 0; i < n; i++, p += 2) out[i] = view.getInt16(p, little);
      return -1;
    case 5:
    case 6: {
      // x − x is 0 for every finite x and NaN otherwise: one test in the same pass.
      let bad = 0;
      if (code === 5) for (let i = 0; i < n; i++, p += 4) bad += (out[i] = view.getFloat32(p, little)) - out[i];
      else for (let i = 0; i < n; i++, p += 8) bad += (out[i] = view.getFloat64(p, little)) - out[i];
      if (bad === 0) return -1;
      for (let i = 0; i < n; i++) if (!Number.isFinite(out[i])) return i;
      return -1;
    }
    case 7:
    case 15:
      for (let i = 0; i < n; i++, p += 3) {
        const b0 = view.getUint8(p);
        const b1 = view.getUint8(p + 1);
        const b2 = view.getUint8(p + 2);
        let v = little ? b0 | (b1 << 8) | (b2 << 16) : (b0 << 16) | (b1 << 8) | b2;
        if (code === 7 && v & 0x800000) v -= 0x1000000;
        out[i] = v;
      }
      return -1;
    case 8:
      for (let i = 0; i < n; i++, p += 1) out[i] = view.getInt8(p);
      return -1;
    case 9:
      for (let i = 0; i < n; i++, p += 8) out[i] = Number(view.getBigInt64(p, little));
      return -1;
    case 10:
      for (let i = 0; i < n; i++, p += 4) out[i] = view.getUint32(p, little);
      return -1;
    case 11:
      for (let i = 0; i < n; i++, p += 2) out[i] = view.getUint16(p, little);
      return -1;
    case 12:
      for (let i = 0; i < n; i++, p += 8) out[i] = Number(view.getBigUint64(p, little));
      return -1;
    case 16:
      for (let i = 0; i < n; i++, p += 1) out[i] = view.getUint8(p);
      return -1;
  }
}

/** The range a code can hold exactly as integers, or null for the floating-point codes. */
export function integerRange(code: SegyFormatCode): [number, number] | null {
  switch (code) {
    case 2:
      return [-0x80000000, 0x7fffffff];
    case 3:
      return [-0x8000, 0x7fff];
    case 7:
      return [-0x800000, 0x7fffff];
    case 8:
      return [-0x80, 0x7f];
    case 9:
      return [-Number.MAX_SAFE_INTEGER, Number.MAX_SAFE_INTEGER];
    case 10:
      return [0, 0xffffffff];
    case 11:
      return [0, 0xffff];
    case 12:
      return [0, Number.MAX_SAFE_INTEGER];
    case 15:
      return [0, 0xffffff];
    case 16:
      return [0, 0xff];
    default:
      return null;
  }
}

/**
 * Encodes `values` in format `code` at byte `start` of `view`. Integer codes
 * take the values rounded to the nearest integer; the caller has checked the
 * range (integerRange) and, for code 1, |value| ≤ IBM_MAX.
 */
export function encodeSamples(view: DataView, start: number, code: SegyFormatCode, little: boolean, values: ArrayLike<number>): void {
  let p = start;
  const size = SEGY_FORMATS[code].bytes;
  for (let i = 0; i < values.length; i++, p += size) {
    const x = values[i];
    const r = Math.round(x);
    switch (code) {
      case 1:
        view.setUint32(p, ibmBitsFromNumber(x), little);
        break;
      case 2:
        view.setInt32(p, r, little);
        break;
      case 3:
        view.setInt16(p, r, little);
        break;
      case 5:
        view.setFloat32(p, x, little);
        break;
      case 6:
        view.setFloat64(p, x, little);
        break;
      case 7:
      case 15: {
        const v = r < 0 ? r + 0x1000000 : r;
        const b = [(v >> 16) & 0xff, (v >> 8) & 0xff, v & 0xff];
        if (little) b.reverse();
        view.setUint8(p, b[0]);
        view.setUint8(p + 1, b[1]);
        view.setUint8(p + 2, b[2]);
        break;
      }
      case 8:
        view.setInt8(p, r);
        break;
      case 9:
        view.setBigInt64(p, BigInt(r), little);
        break;
      case 10:
        view.setUint32(p, r, little);
        break;
      case 11:
        view.setUint16(p, r, little);
        break;
      case 12:
        view.setBigUint64(p, BigInt(r), little);
        break;
      case 16:
        view.setUint8(p, r);
        break;
    }
  }
}
