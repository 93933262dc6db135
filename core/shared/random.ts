/**
 * Seeded pseudo-random numbers, for the demo picks and for reproducible
 * tests and benchmarks. One generator for the whole project, so that a
 * given seed means the same sequence everywhere.
 *
 * Uniforms: Mulberry32, Tommy Ettinger (2017), a 32-bit generator
 * published by its author as public-domain C code; this is its usual
 * JavaScript form. One 32-bit state word advanced by a Weyl step
 * (+0x6D2B79F5), then a mixing function. Period 2^32; statistical
 * quality ample for noise and test inputs; NOT for cryptography.
 *
 * Normals: the Box–Muller transform (G. E. P. Box and M. E. Muller, "A
 * note on the generation of random normal deviates", Annals of
 * Mathematical Statistics 29(2), 610–611, 1958), cosine branch only.
 */

/**
 * A Mulberry32 generator: each call returns the next uniform number in
 * [0, 1) (a multiple of 2^-32). Deterministic for a given seed; the seed
 * is taken modulo 2^32.
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * One standard normal number (mean 0, sd 1) from two draws of `uniform`
 * by the Box–Muller transform: √(−2 ln(1 − u)) · cos(2πv). Using 1 − u
 * keeps the logarithm finite, as `uniform` may return 0 but never 1.
 */
export function gaussian(uniform: () => number): number {
  const u = 1 - uniform();
  const v = uniform();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

/** A generator of standard normal numbers drawing on `uniform` (see gaussian). */
export function normals(uniform: () => number): () => number {
  return () => gaussian(uniform);
}
