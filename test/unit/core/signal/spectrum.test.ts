/**
 * spectrum.ts wraps fft.js: its sign convention and scaling are checked
 * against a direct DFT written out here (X[k] = Σ x[n]·e^(−i2πkn/N), the
 * definition), and the analytic signal against the closed form of a cosine
 * (its analytic signal is e^(iωt): envelope 1, phase rate ω).
 */
import { describe, expect, it } from 'vitest';
import { analyticSignal, fftSize, inverseComplex, MAX_FFT_SIZE, realSpectrum } from '../../../../core/signal/spectrum';
import { mulberry32 } from '../../../../core/shared/random';

describe('fftSize', () => {
  it('pads to the next power of two from 2 up, and refuses sizes beyond the cap', () => {
    expect(fftSize(1)).toBe(2);
    expect(fftSize(2)).toBe(2);
    expect(fftSize(3)).toBe(4);
    expect(fftSize(1000)).toBe(1024);
    expect(fftSize(1024)).toBe(1024);
    expect(fftSize(MAX_FFT_SIZE + 1)).toBeNaN();
  });
});

describe('realSpectrum and inverseComplex', () => {
  it('match a direct DFT of a zero-padded random trace, and invert it', () => {
    const rand = mulberry32(5);
    const x = Array.from({ length: 27 }, () => rand() - 0.5);
    const N = fftSize(x.length);
    const spec = realSpectrum(x, N);
    for (let k = 0; k < N; k++) {
      let re = 0;
      let im = 0;
      for (let n = 0; n < x.length; n++) {
        re += x[n] * Math.cos((-2 * Math.PI * k * n) / N);
        im += x[n] * Math.sin((-2 * Math.PI * k * n) / N);
      }
      expect(Math.abs(spec[2 * k] - re)).toBeLessThan(1e-12);
      expect(Math.abs(spec[2 * k + 1] - im)).toBeLessThan(1e-12);
    }
    const back = inverseComplex(spec);
    for (let n = 0; n < N; n++) {
      expect(Math.abs(back[2 * n] - (x[n] ?? 0))).toBeLessThan(1e-12);
      expect(Math.abs(back[2 * n + 1])).toBeLessThan(1e-12);
    }
  });

  it('gives the analytic signal of a whole-period cosine: envelope 1 and phase advancing by ωΔt', () => {
    const N = 256;
    const cycles = 17;
    const x = Array.from({ length: N }, (_, n) => Math.cos((2 * Math.PI * cycles * n) / N + 0.3));
    const a = analyticSignal(realSpectrum(x, N));
    for (let n = 0; n < N; n++) {
      expect(Math.abs(Math.hypot(a[2 * n], a[2 * n + 1]) - 1)).toBeLessThan(1e-12);
      expect(Math.abs(a[2 * n] - x[n])).toBeLessThan(1e-12);
      const want = (2 * Math.PI * cycles * n) / N + 0.3;
      const got = Math.atan2(a[2 * n + 1], a[2 * n]);
      expect(Math.abs(Math.atan2(Math.sin(got - want), Math.cos(got - want)))).toBeLessThan(1e-12);
    }
  });
});
