/**
 * Phase-velocity image of a gather by the phase-shift method.
 *
 * Method (Park, Miller & Xia 1998, "Imaging dispersion curves of surface
 * waves on multi-channel record", SEG Expanded Abstracts 1377–1380): each
 * trace's spectrum U_j(f) is divided by its modulus, so only phase remains;
 * for each trial phase velocity c the unit spectra are steered back by the
 * travel time x_j/c and summed,
 *
 *   V(f, c) = Σ_j exp(+i2πf·x_j/c) · U_j(f)/|U_j(f)|
 *
 * (the e^(−iωt) forward transform of spectrum.ts; a wave u(t − x/c) has
 * spectrum U(f)·e^(−i2πf·x/c), so the steering undoes exactly that delay).
 * The cell's value is the coherence |V|²/N² (1 when all traces agree, about
 * 1/N for noise); each row is then scaled to a largest value of 1 and the
 * coherence of its peak kept in `strength`.
 *
 * Frequencies: each trace is zero-padded (spectrum.ts) so that the spectral
 * lines are at most the requested frequency step apart, and each row uses
 * the line nearest the requested frequency (so no two rows share a line);
 * the image reports the line's own frequency, so every row's phase is
 * exact at its stated frequency.
 *
 * Reliability (shared/PHYSICS.md §10): a row whose peak coherence is no
 * more than noise gives (incoherentBelow) is UNRELIABLE throughout; a wavelength λ = c/f under two
 * receiver spacings is spatially aliased (UNRELIABLE); λ over twice the
 * spread length cannot be resolved by the spread (UNRELIABLE); λ between
 * one and two spread lengths is MARGINAL (within about 5 %, common
 * practice); λ up to the spread length is RELIABLE.
 *
 * Cost: one FFT per trace, then rows × columns × traces complex terms
 * (a rotation recurrence replaces the sine and cosine on a regular line).
 */
import { InputError } from '../shared/errors';
import { checkGather, spreadOf, type Gather } from './gather';
import { checkAxis, linearAxis, MARGINAL, normaliseRows, RELIABLE, UNRELIABLE, type DispersionImage } from './image';
import { fftSize, realSpectrum } from './spectrum';

export interface PhaseShiftOptions {
  /** Row frequencies, Hz, ascending. @default 100 evenly spaced from 2 Hz (or 4/record length) to min(0.4/sample interval, 100 Hz) */
  frequencies?: ArrayLike<number>;
  /** Column velocities, m/s, ascending. @default 200 evenly spaced from 50 to 1000 m/s */
  velocities?: ArrayLike<number>;
}

/** Default velocity axis: 50–1000 m/s in 200 steps (near-surface soils and soft rock; common practice). */
export const DEFAULT_VELOCITY_AXIS = { from: 50, to: 1000, count: 200 } as const;
/** Default row count of the frequency axis. */
export const DEFAULT_FREQUENCY_COUNT = 100;

/** Fraction of the row's spectral peak below which a trace's line carries no phase (left out of the sum). */
const SILENT_LINE = 1e-9;

/** The default frequency axis of a record: from max(2 Hz, 4/T) to min(0.4/dt, 100 Hz). */
export function defaultFrequencyAxis(samples: number, sampleInterval: number, count = DEFAULT_FREQUENCY_COUNT): Float64Array {
  const T = samples * sampleInterval;
  const from = Math.max(2, 4 / T);
  const to = Math.min(0.4 / sampleInterval, 100);
  return linearAxis(from, to > from ? to : from * 2, count, 'frequency', 'Hz');
}

/**
 * The phase-shift image of a gather of at least 2 traces at 2 or more
 * distinct offsets. Throws InputError for a bad gather or axis (a
 * frequency at or above the Nyquist frequency included).
 */
export function phaseShiftImage(gather: Gather, options: PhaseShiftOptions = {}): DispersionImage {
  const offsets = checkGather(gather, 2);
  const spread = spreadOf(offsets);
  if (!(spread.length > 0)) {
    throw new InputError('record.offsets', 'The phase-shift method needs traces at two or more different offsets, but every trace has the same offset.');
  }
  const n = gather.traces[0].length;
  const dt = gather.sampleInterval;
  const freqsAsked = options.frequencies ? checkAxis(options.frequencies, 'frequency', 'Hz') : defaultFrequencyAxis(n, dt);
  const velocities = options.velocities
    ? checkAxis(options.velocities, 'velocity', 'm/s')
    : linearAxis(DEFAULT_VELOCITY_AXIS.from, DEFAULT_VELOCITY_AXIS.to, DEFAULT_VELOCITY_AXIS.count, 'velocity', 'm/s');
  const nyquist = 0.5 / dt;
  if (freqsAsked[freqsAsked.length - 1] >= nyquist) {
    throw new InputError(
      'frequency',
      `The frequency axis must stay below the record's Nyquist frequency (${nyquist} Hz), but it reaches ${freqsAsked[freqsAsked.length - 1]} Hz.`,
    );
  }

  // Spectral lines at most the smallest requested step apart.
  let minStep = Infinity;
  for (let i = 1; i < freqsAsked.length; i++) minStep = Math.min(minStep, freqsAsked[i] - freqsAsked[i - 1]);
  const size = fftSize(Math.max(n, Math.ceil(1 / (minStep * dt))));
  if (Number.isNaN(size)) {
    throw new InputError('frequency', `The frequency step (${minStep} Hz) is too fine for a ${n * dt} s record; use fewer frequencies.`);
  }
  const df = 1 / (size * dt);
  const rows = freqsAsked.length;
  const cols = velocities.length;
  const traces = gather.traces.length;
  const bins = new Int32Array(rows);
  const frequencies = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    bins[i] = Math.max(1, Math.round(freqsAsked[i] / df));
    frequencies[i] = bins[i] * df;
  }

  // Unit phasors per row and trace, traces in offset order: re at [i·traces + k], im likewise.
  const order = Array.from(offsets.keys()).sort((a, b) => offsets[a] - offsets[b]);
  const x = Float64Array.from(order, (j) => offsets[j]);
  const pr = new Float64Array(rows * traces);
  const pi = new Float64Array(rows * traces);
  const spec = new Float64Array(2 * size);
  for (let j = 0; j < traces; j++) {
    realSpectrum(gather.traces[order[j]], size, spec);
    let peak = 0;
    for (let i = 0; i < rows; i++) peak = Math.max(peak, Math.sqrt(spec[2 * bins[i]] ** 2 + spec[2 * bins[i] + 1] ** 2));
    for (let i = 0; i < rows; i++) {
      const re = spec[2 * bins[i]];
      const im = spec[2 * bins[i] + 1];
      const a = Math.sqrt(re * re + im * im);
      if (a > SILENT_LINE * peak && a > 0) {
        pr[i * traces + j] = re / a;
        pi[i * traces + j] = im / a;
      }
    }
  }

  const x0 = x[0];
  const power = new Float64Array(rows * cols);
  const norm = 1 / (traces * traces);
  for (let i = 0; i < rows; i++) {
    const w = 2 * Math.PI * frequencies[i];
    const o = i * traces;
    for (let c = 0; c < cols; c++) {
      const s = 1 / velocities[c];
      let vr = 0;
      let vi = 0;
      if (spread.regular) {
        // e^(iω·x_j·s) = e^(iω·x0·s) · (e^(iω·dx·s))^k along the sorted line.
        const stepR = Math.cos(w * spread.spacing * s);
        const stepI = Math.sin(w * spread.spacing * s);
        let zr = Math.cos(w * x0 * s);
        let zi = Math.sin(w * x0 * s);
        for (let k = 0; k < traces; k++) {
          const ur = pr[o + k];
          const ui = pi[o + k];
          vr += zr * ur - zi * ui;
          vi += zr * ui + zi * ur;
          const nr = zr * stepR - zi * stepI;
          zi = zr * stepI + zi * stepR;
          zr = nr;
        }
      } else {
        for (let j = 0; j < traces; j++) {
          const phase = w * x[j] * s;
          const zr = Math.cos(phase);
          const zi = Math.sin(phase);
          const ur = pr[o + j];
          const ui = pi[o + j];
          vr += zr * ur - zi * ui;
          vi += zr * ui + zi * ur;
        }
      }
      power[i * cols + c] = (vr * vr + vi * vi) * norm;
    }
  }
  const strength = normaliseRows(power, rows, cols);

  const reliability = new Uint8Array(rows * cols);
  let aliased = false;
  let long = false;
  let marginal = false;
  let incoherent = false;
  const floor = incoherentBelow(traces, cols);
  for (let i = 0; i < rows; i++) {
    if (strength[i] < floor) {
      incoherent = true; // every cell stays UNRELIABLE (0)
      continue;
    }
    for (let c = 0; c < cols; c++) {
      const lambda = velocities[c] / frequencies[i];
      let level = RELIABLE;
      if (lambda < 2 * spread.spacing) {
        level = UNRELIABLE;
        aliased = true;
      } else if (lambda > 2 * spread.length) {
        level = UNRELIABLE;
        long = true;
      } else if (lambda > spread.length) {
        level = MARGINAL;
        marginal = true;
      }
      reliability[i * cols + c] = level;
    }
  }
  const notes: string[] = [];
  const L = round(spread.length);
  const dx = round(spread.spacing);
  if (aliased) notes.push(`Wavelengths under two receiver spacings (2 × ${dx} m) are spatially aliased: unreliable.`);
  if (long) notes.push(`Wavelengths over twice the spread length (2 × ${L} m) cannot be resolved by the spread: unreliable.`);
  if (incoherent) {
    notes.push(`Frequencies where the traces hardly agree (coherence under ${floor.toFixed(2)}; noise gives about ${(1 / traces).toFixed(2)}) are unreliable.`);
  }
  if (marginal) notes.push(`Wavelengths between one and two spread lengths (${L}–${round(2 * spread.length)} m) are marginal (within about 5 %, common practice).`);

  return {
    method: 'phase-shift',
    frequencies,
    velocities,
    power,
    strength,
    instantaneousFrequency: null,
    reliability,
    notes,
    resolution: { recordSeconds: n * dt, sampleInterval: dt, spread: spread.length, distance: 0, traces },
    ...(gather.name !== undefined ? { name: gather.name } : {}),
  };
}

/**
 * The peak coherence under which a row of `columns` velocities over
 * `traces` traces is taken for noise. For noise the unit spectra are random
 * phasors, so N·|V|²/N² at one velocity is exponential with mean 1, and the
 * largest of M such values exceeds ln M + 5 with probability about e⁻⁵
 * (0.7 %; the Gumbel limit of the maximum, derived; neighbouring
 * velocities are correlated, which only makes it rarer). The floor is
 * (ln M + 5)/N, at most 0.5 (this tool's choice).
 */
export function incoherentBelow(traces: number, columns: number): number {
  return Math.min(0.5, (Math.log(columns) + 5) / traces);
}

function round(x: number): number {
  return Math.round(x * 100) / 100;
}
