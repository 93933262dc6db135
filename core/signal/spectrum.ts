/**
 * Spectra of real traces and analytic signals, through the general-purpose
 * radix-4 FFT of the fft.js package (pinned in package.json).
 *
 * Conventions: the forward transform is X[k] = Σ_n x[n]·e^(−i2πkn/N) (the
 * e^(−iωt) kernel; fft.js's own convention, checked in the tests against a
 * direct DFT), the inverse divides by N. Complex arrays are interleaved
 * (re, im, re, im, …). fft.js takes only powers of two from 2 up, so every
 * trace is zero-padded to the next power of two at or above the length
 * asked for (fftSize).
 *
 * FFT objects hold their twiddle tables; one per size is kept and reused
 * (a plain cache, no global state visible to callers).
 */
import FFT from 'fft.js';

/** Largest transform this module makes: 2^22 points (a 4-million-sample padded trace). */
export const MAX_FFT_SIZE = 1 << 22;

const cache = new Map<number, FFT>();

/** The fft.js instance for a power-of-two size, made once. */
function fftOf(size: number): FFT {
  let f = cache.get(size);
  if (f === undefined) {
    f = new FFT(size);
    cache.set(size, f);
  }
  return f;
}

/**
 * The next size fft.js supports (a power of two ≥ 2) at or above n.
 * Returns NaN when that size would exceed MAX_FFT_SIZE.
 */
export function fftSize(n: number): number {
  let size = 2;
  while (size < n) size *= 2;
  return size > MAX_FFT_SIZE ? NaN : size;
}

/**
 * The full complex spectrum (interleaved, length 2·size) of a real trace
 * zero-padded to `size` (a power of two ≥ trace length). `out`, if given,
 * must have length 2·size and is filled and returned.
 */
export function realSpectrum(trace: ArrayLike<number>, size: number, out?: Float64Array): Float64Array {
  const input = new Float64Array(size);
  const n = Math.min(trace.length, size);
  for (let i = 0; i < n; i++) input[i] = trace[i];
  const spec = out ?? new Float64Array(2 * size);
  const f = fftOf(size);
  f.realTransform(spec, input);
  f.completeSpectrum(spec);
  return spec;
}

/** The inverse transform (divided by N) of an interleaved complex spectrum, into `out` (a fresh array if not given). */
export function inverseComplex(spectrum: Float64Array, out?: Float64Array): Float64Array {
  const size = spectrum.length / 2;
  const result = out ?? new Float64Array(spectrum.length);
  fftOf(size).inverseTransform(result, spectrum);
  return result;
}

/**
 * The analytic signal of a real trace from its spectrum (interleaved,
 * length 2N): positive frequencies doubled, DC and Nyquist kept once,
 * negative frequencies zeroed, then the inverse transform. Its real part is
 * the trace, its modulus the envelope (Bracewell, *The Fourier Transform
 * and Its Applications*, 3rd ed. 2000, the chapter on the Hilbert
 * transform; chapter from memory, verify).
 */
export function analyticSignal(spectrum: Float64Array, out?: Float64Array): Float64Array {
  const size = spectrum.length / 2;
  const half = new Float64Array(spectrum.length);
  half[0] = spectrum[0];
  half[1] = spectrum[1];
  for (let k = 1; k < size / 2; k++) {
    half[2 * k] = 2 * spectrum[2 * k];
    half[2 * k + 1] = 2 * spectrum[2 * k + 1];
  }
  half[size] = spectrum[size];
  half[size + 1] = spectrum[size + 1];
  return inverseComplex(half, out);
}
