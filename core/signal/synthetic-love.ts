/**
 * Synthetic Love-wave records from the core's own modal solution, for
 * tests, benchmarks and the app's invented demo record.
 *
 * What: a gather of transverse-component traces at the given offsets, the
 * sum of the chosen Love modes of a layered model, each with a stated
 * excitation (amplitude), from a source whose spectrum is the Ricker
 * wavelet's, S(f) = (f/f_p)²·exp(−(f/f_p)²) (Ricker 1953, Geophysics 18:10;
 * zero-phase, centred on the source instant).
 *
 * Method: a far-field modal sum in the frequency domain. Mode m travels
 * with the phase velocity c_m(f) of core/dispersion/curve.ts, so the trace
 * at distance x has the spectrum Σ_m A_m·S(f)·e^(−i2πf·x/c_m(f)) (times
 * 1/√x geometric spreading, when asked), shifted so that sample k is at
 * time startTime + k·dt; a mode contributes nothing below its cutoff. The
 * traces are made on a transform four times the record length (spectrum.ts)
 * and cut to it, so slow energy does not wrap round. Seeded Gaussian noise
 * (core/shared/random.ts) is added at a stated fraction of the noise-free
 * gather's rms.
 *
 * Not included: attenuation, the near field, the source radiation pattern
 * and the modes' depth-dependent excitation (the amplitudes stand in for
 * it). Its group and phase velocities are exactly the modal solution's,
 * which is what the dispersion-image checks need.
 */
import { loveCurves } from '../dispersion/curve';
import { validateModel, type LayeredModel } from '../dispersion/model';
import { InputError } from '../shared/errors';
import { gaussian, mulberry32 } from '../shared/random';
import { GATHER_LIMITS, type Gather } from './gather';
import { fftSize, inverseComplex } from './spectrum';

export interface SyntheticMode {
  /** Mode number, 0 = fundamental. */
  mode: number;
  /** Relative excitation (amplitude factor). */
  amplitude: number;
}

export interface SyntheticLoveOptions {
  /** Source–receiver distances, m. */
  offsets: ArrayLike<number>;
  /** Sample interval, s. */
  sampleInterval: number;
  /** Samples per trace. */
  samples: number;
  /** Time of the first sample after the source instant, s. @default 0 */
  startTime?: number;
  /** Peak frequency of the Ricker source spectrum, Hz. */
  peakHz: number;
  /** The modes in the record and their excitation. @default [{ mode: 0, amplitude: 1 }] */
  modes?: readonly SyntheticMode[];
  /** Noise: sd as a fraction of the noise-free gather's rms, and the generator seed. @default none */
  noise?: { level: number; seed: number };
  /** Scale each trace by 1/√x (cylindrical spreading of surface waves). @default true */
  spreading?: boolean;
  /** The record's name. */
  name?: string;
}

/** Source spectrum below this fraction of its peak is left out (saves solving the modes there). */
const SPECTRUM_FLOOR = 1e-10;

/** A synthetic Love-wave gather (see the header). Throws InputError for bad options or a bad model. */
export function syntheticLoveGather(model: LayeredModel, options: SyntheticLoveOptions): Gather {
  validateModel(model);
  const { sampleInterval: dt, samples: n, peakHz } = options;
  const t0 = options.startTime ?? 0;
  if (!Number.isInteger(n) || n < GATHER_LIMITS.minSamples || n > GATHER_LIMITS.maxSamples) {
    throw new InputError('samples', `samples must be a whole number from ${GATHER_LIMITS.minSamples} to ${GATHER_LIMITS.maxSamples}, but it is ${n}.`);
  }
  if (!Number.isFinite(dt) || dt < GATHER_LIMITS.minSampleInterval || dt > GATHER_LIMITS.maxSampleInterval) {
    throw new InputError('sampleInterval', `sampleInterval must be from ${GATHER_LIMITS.minSampleInterval} to ${GATHER_LIMITS.maxSampleInterval} s, but it is ${dt}.`);
  }
  if (!Number.isFinite(peakHz) || peakHz <= 0 || peakHz >= 0.25 / dt) {
    throw new InputError('peakHz', `peakHz must be above 0 and under a quarter of the sampling rate (${0.25 / dt} Hz), but it is ${peakHz}.`);
  }
  if (!Number.isFinite(t0) || Math.abs(t0) > n * dt) {
    throw new InputError('startTime', `startTime must be a finite time no longer than the record, but it is ${t0}.`);
  }
  const offsets = Float64Array.from(options.offsets);
  if (offsets.length < 1 || offsets.length > GATHER_LIMITS.maxTraces) {
    throw new InputError('offsets', `offsets must list 1 to ${GATHER_LIMITS.maxTraces} distances, but it lists ${offsets.length}.`);
  }
  for (let j = 0; j < offsets.length; j++) {
    if (!Number.isFinite(offsets[j]) || offsets[j] < 0 || offsets[j] > GATHER_LIMITS.maxOffset) {
      throw new InputError(`offsets[${j + 1}]`, `Offset ${j + 1} must be a distance from 0 to ${GATHER_LIMITS.maxOffset} m, but it is ${offsets[j]}.`);
    }
  }
  const modes = options.modes ?? [{ mode: 0, amplitude: 1 }];
  let topMode = 0;
  for (const m of modes) {
    if (!Number.isInteger(m.mode) || m.mode < 0 || m.mode > 20 || !Number.isFinite(m.amplitude)) {
      throw new InputError('modes', `Each synthetic mode needs a mode number from 0 to 20 and a finite amplitude, but one has ${m.mode} and ${m.amplitude}.`);
    }
    topMode = Math.max(topMode, m.mode);
  }
  if (options.noise && !(Number.isFinite(options.noise.level) && options.noise.level >= 0 && options.noise.level <= 100)) {
    throw new InputError('noise.level', `noise.level must be a fraction from 0 to 100 of the signal's rms, but it is ${options.noise.level}.`);
  }

  const size = fftSize(4 * n);
  const df = 1 / (size * dt);
  const source = (f: number) => (f / peakHz) ** 2 * Math.exp(-((f / peakHz) ** 2));
  const bins: number[] = [];
  for (let k = 1; k < size / 2; k++) if (source(k * df) > SPECTRUM_FLOOR) bins.push(k);
  const curves = loveCurves(model, bins.map((k) => k * df), { modes: topMode + 1 });

  const traces: Float64Array[] = [];
  const spec = new Float64Array(2 * size);
  const out = new Float64Array(2 * size);
  const spreading = options.spreading ?? true;
  for (let j = 0; j < offsets.length; j++) {
    spec.fill(0);
    const x = offsets[j];
    const g = spreading ? 1 / Math.sqrt(Math.max(x, 1)) : 1;
    for (const m of modes) {
      const curve = curves.modes[m.mode];
      for (let q = 0; q < curve.frequency.length; q++) {
        const f = curve.frequency[q];
        const k = Math.round(f / df);
        const amp = g * m.amplitude * source(f);
        const phase = -2 * Math.PI * f * (x / curve.phase[q] - t0);
        const re = amp * Math.cos(phase);
        const im = amp * Math.sin(phase);
        spec[2 * k] += re;
        spec[2 * k + 1] += im;
        spec[2 * (size - k)] += re;
        spec[2 * (size - k) + 1] -= im;
      }
    }
    inverseComplex(spec, out);
    const trace = new Float64Array(n);
    for (let s = 0; s < n; s++) trace[s] = out[2 * s];
    traces.push(trace);
  }

  if (options.noise && options.noise.level > 0) {
    let sum = 0;
    for (const t of traces) for (const v of t) sum += v * v;
    const sd = options.noise.level * Math.sqrt(sum / (traces.length * n));
    const rand = mulberry32(options.noise.seed);
    for (const t of traces) for (let s = 0; s < n; s++) t[s] += sd * gaussian(rand);
  }
  return { traces, sampleInterval: dt, startTime: t0, offsets, ...(options.name !== undefined ? { name: options.name } : {}) };
}
