/**
 * IBM System/360 hexadecimal floating point, single precision (SEG-Y sample
 * format 1): 1 sign bit, a 7-bit exponent of 16 biased by 64, and a 24-bit
 * fraction F, value = (−1)^s · (F / 2²⁴) · 16^(e − 64). [std: IBM System/360
 * Principles of Operation, floating-point data format; SEG-Y rev 1 §4]
 * Check values: 0xC276A000 = −118.625, 0x42640000 = 100.0, 0x41100000 = 1.0.
 *
 * Decoding is exact in double precision (24 fraction bits). Encoding rounds
 * the fraction to nearest; values beyond the format's range (about 7.2e75)
 * are reported by returning NaN from ibmBitsFromNumber's caller check.
 */

/** 2^(4(e − 64) − 24) for each 7-bit exponent e. */
const SCALE = new Float64Array(128);
for (let e = 0; e < 128; e++) SCALE[e] = Math.pow(2, 4 * (e - 64) - 24);

/** The number held by 32 IBM-float bits (an unsigned 32-bit integer). */
export function numberFromIbmBits(bits: number): number {
  const fraction = bits & 0x00ffffff;
  const value = fraction * SCALE[(bits >>> 24) & 0x7f];
  return bits & 0x80000000 ? -value : value;
}

/** Largest IBM single: (1 − 16⁻⁶) · 16⁶³. */
export const IBM_MAX = (1 - Math.pow(16, -6)) * Math.pow(16, 63);

/**
 * The 32 bits (unsigned) of the IBM float nearest to `x`. Zero, and
 * magnitudes below the smallest normal (16⁻⁶⁵), give +0. Throws a RangeError
 * for a non-finite x or |x| > IBM_MAX; callers check first.
 */
export function ibmBitsFromNumber(x: number): number {
  if (!Number.isFinite(x) || Math.abs(x) > IBM_MAX) throw new RangeError(`${x} cannot be written as an IBM float.`);
  if (x === 0) return 0;
  const sign = x < 0 ? 0x80000000 : 0;
  let a = Math.abs(x);
  let e = 64;
  while (a >= 1 && e < 128) {
    a /= 16;
    e++;
  }
  while (a < 1 / 16 && e > 0) {
    a *= 16;
    e--;
  }
  if (a < 1 / 16) return 0;
  let fraction = Math.round(a * 0x1000000);
  if (fraction >= 0x1000000) {
    fraction >>>= 4;
    e++;
  }
  if (e > 127) throw new RangeError(`${x} cannot be written as an IBM float.`);
  return (sign | (e << 24) | fraction) >>> 0;
}
