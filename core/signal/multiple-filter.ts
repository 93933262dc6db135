/**
 * Group-velocity image of one trace by multiple-filter analysis.
 *
 * Method (Dziewonski, Bloch & Landisman 1969, "A technique for the
 * analysis of transient seismic signals", BSSA 59:427–444; the
 * instantaneous-frequency correction as in Herrmann 1973, BSSA 63:663):
 * for each centre frequency f_n the trace's spectrum X(f) is multiplied by
 * the Gaussian H_n(f) = exp[−α((f − f_n)/f_n)²] on positive frequencies
 * only (doubled), so the inverse transform is the analytic signal a_n(t) of
 * the filtered trace. Its modulus is the envelope; its phase rate
 * (1/2π)·d arg a_n/dt is the instantaneous frequency. The envelope at time
 * t belongs to group velocity U = x/t, where t counts from the source
 * instant (t = startTime + k·dt for sample k, gather.ts): each column of a
 * row is the envelope at t = x/U. A ridge pick takes its frequency from the
 * instantaneous frequency at the envelope peak, not from f_n: the
 * correction matters near the group-velocity minimum (Airy phase).
 *
 * Instantaneous frequency: arg(a(t+Δ)·conj(a(t−Δ)))/(4π·Δ), exact for a
 * single complex exponential.
 *
 * Speed: each filtered band is shifted down by its centre line k_c and
 * inverse-transformed on M points, the next power of two at or above
 * twice the band's width in lines and 16 points per half-amplitude width
 * of the envelope: that gives the same analytic signal at
 * every (size/M)-th sample, as a(mΔ) = (M/size)·e^(i2π·k_c·m/M)·b[m] with b
 * the short transform, so the envelope is |b|·M/size (interpolated
 * quadratically between samples) and the instantaneous frequency is b's
 * plus k_c's. The filter is cut where it falls under e^−20.
 *
 * Filter width α (derived, not published; shared/PHYSICS.md §10): the
 * envelope of H_n's impulse response is exp(−π²f_n²t²/α), whose full width
 * at half amplitude is 0.53·√α/f_n. Keeping it under a third of the travel
 * time x/U gives α ≤ 0.4·(x·f_n/U)², i.e. 0.4 × (wavelengths travelled)².
 * U is taken as the velocity of the broadband envelope's peak (the dominant
 * arrival), and α is clamped to 2–50. A near-surface record at 30 m and
 * 20 Hz (U ≈ 200 m/s, 3 wavelengths) thus gets α ≈ 3.6: broad filters,
 * coarse frequency resolution, which is why short offsets are marked.
 *
 * Reliability: the wavelength is taken as U/f at each cell (the phase
 * velocity is unknown from one trace; it is normally faster, so the true
 * count of wavelengths is a little lower). Travel of 3 or more wavelengths
 * is RELIABLE, 2–3 MARGINAL, under 2 UNRELIABLE. Where the strongest
 * arrival's group velocity has an interior minimum (the Airy phase, at
 * f_A), frequencies below 1.25·f_A are UNRELIABLE: there the method is
 * biased (common practice; the 1.25 factor is this tool's choice).
 *
 * Two receivers: with a reference (nearer) trace, the cross-spectrum
 * X_far·conj(X_near) replaces X, the time axis becomes the lag between the
 * receivers and x their distance apart, so a trigger-time error cancels.
 */
import { InputError } from '../shared/errors';
import { checkGather, type Gather } from './gather';
import { checkAxis, linearAxis, MARGINAL, normaliseRows, RELIABLE, UNRELIABLE, type DispersionImage } from './image';
import { DEFAULT_VELOCITY_AXIS, defaultFrequencyAxis } from './phase-shift';
import { analyticSignal, fftSize, inverseComplex, realSpectrum } from './spectrum';

export interface MultipleFilterOptions {
  /** Index (0-based) of the trace to analyse. @default the trace with the largest offset */
  trace?: number;
  /** Index (0-based) of a nearer reference trace, for the two-receiver form. @default none (one trace) */
  reference?: number;
  /** Filter centre frequencies, Hz, ascending. @default as phase-shift.ts defaultFrequencyAxis */
  frequencies?: ArrayLike<number>;
  /** Column group velocities, m/s, ascending. @default 200 evenly spaced from 50 to 1000 m/s */
  velocities?: ArrayLike<number>;
  /** A fixed filter parameter α for every row. @default chosen per row from the wavelengths travelled (see above) */
  alpha?: number;
}

/** α ≤ ALPHA_PER_WAVELENGTH_SQUARED × (wavelengths travelled)² (derived above). */
export const ALPHA_PER_WAVELENGTH_SQUARED = 0.4;
/** Clamp of the automatic α (this tool's choice: α = 50 gives ±8.3 % half-power filters). */
export const ALPHA_RANGE = { min: 2, max: 50 } as const;
/** Wavelengths of travel for RELIABLE and MARGINAL cells (common practice). */
export const WAVELENGTHS_RELIABLE = 3;
export const WAVELENGTHS_MARGINAL = 2;
/** Frequencies below this multiple of the group-velocity minimum's are unreliable (the Airy band). */
export const AIRY_FACTOR = 1.25;
/** The filter is cut where exp(−α r²) < e^−FILTER_REACH (2e-9 of its peak). */
const FILTER_REACH = 20;
/** Rows whose power peak is under this fraction of the strongest (amplitude 10 %) are unreliable throughout (common practice). */
export const FAINT_ROW = 0.01;
/** Rows weaker than this fraction of the strongest take no part in finding the Airy minimum. */
const AIRY_MIN_STRENGTH = 0.01;
/** The minimum counts as interior when both ends of the curve are this much faster. */
const AIRY_RISE = 1.01;

/** The filter parameter α chosen for centre frequency f (Hz), travel x (m) and group velocity u (m/s). */
export function autoAlpha(f: number, x: number, u: number): number {
  const a = ALPHA_PER_WAVELENGTH_SQUARED * ((x * f) / u) ** 2;
  return Math.min(ALPHA_RANGE.max, Math.max(ALPHA_RANGE.min, a));
}

/**
 * The multiple-filter image of one trace of a gather (or of the pair
 * trace/reference). Throws InputError for a bad gather, axis, trace index,
 * α, or a zero travel distance.
 */
export function multipleFilterImage(gather: Gather, options: MultipleFilterOptions = {}): DispersionImage {
  const offsets = checkGather(gather, 1);
  const count = gather.traces.length;
  const traceIndex = options.trace ?? farthest(offsets);
  checkIndex(traceIndex, count, 'trace');
  const n = gather.traces[0].length;
  const dt = gather.sampleInterval;
  const frequencies = options.frequencies ? checkAxis(options.frequencies, 'frequency', 'Hz') : defaultFrequencyAxis(n, dt);
  const velocities = options.velocities
    ? checkAxis(options.velocities, 'velocity', 'm/s')
    : linearAxis(DEFAULT_VELOCITY_AXIS.from, DEFAULT_VELOCITY_AXIS.to, DEFAULT_VELOCITY_AXIS.count, 'velocity', 'm/s');
  const nyquist = 0.5 / dt;
  if (frequencies[frequencies.length - 1] >= nyquist) {
    throw new InputError(
      'frequency',
      `The frequency axis must stay below the record's Nyquist frequency (${nyquist} Hz), but it reaches ${frequencies[frequencies.length - 1]} Hz.`,
    );
  }
  if (options.alpha !== undefined && !(Number.isFinite(options.alpha) && options.alpha >= 0.1 && options.alpha <= 1000)) {
    throw new InputError('alpha', `The filter parameter alpha must be a number from 0.1 to 1000, but it is ${options.alpha}.`);
  }

  const size = fftSize(2 * n);
  const spec = realSpectrum(gather.traces[traceIndex], size);
  let distance = offsets[traceIndex];
  let t0 = gather.startTime;
  const lastSample = n - 1;
  if (options.reference !== undefined) {
    checkIndex(options.reference, count, 'reference');
    distance = offsets[traceIndex] - offsets[options.reference];
    if (!(distance > 0)) {
      throw new InputError(
        'reference',
        `The reference trace (${options.reference + 1}, at ${offsets[options.reference]} m) must be nearer the source than trace ${traceIndex + 1} (at ${offsets[traceIndex]} m).`,
      );
    }
    // Cross-spectrum: far × conj(near). Its inverse is the cross-correlation, lag k·dt.
    const near = realSpectrum(gather.traces[options.reference], size);
    for (let k = 0; k < size; k++) {
      const ar = spec[2 * k];
      const ai = spec[2 * k + 1];
      const br = near[2 * k];
      const bi = -near[2 * k + 1];
      spec[2 * k] = ar * br - ai * bi;
      spec[2 * k + 1] = ar * bi + ai * br;
    }
    t0 = 0;
  } else if (!(distance > 0)) {
    throw new InputError('trace', `Trace ${traceIndex + 1} is at offset 0 m; group velocity needs a source–receiver distance above 0.`);
  }

  const rows = frequencies.length;
  const cols = velocities.length;
  // The dominant arrival's velocity sets the automatic α.
  const broad = analyticSignal(spec);
  let kMax = 0;
  let eMax = -1;
  for (let k = 0; k <= lastSample; k++) {
    const e = broad[2 * k] ** 2 + broad[2 * k + 1] ** 2;
    if (e > eMax) {
      eMax = e;
      kMax = k;
    }
  }
  const tDominant = t0 + kMax * dt;
  const vLow = velocities[0];
  const vHigh = velocities[cols - 1];
  const uDominant = tDominant > 0 ? Math.min(vHigh, Math.max(vLow, distance / tDominant)) : Math.sqrt(vLow * vHigh);

  const alpha = new Float64Array(rows);
  const power = new Float64Array(rows * cols);
  const inst = new Float64Array(rows * cols);
  const binHz = 1 / (size * dt);
  const lastTime = t0 + lastSample * dt;
  for (let i = 0; i < rows; i++) {
    const fn = frequencies[i];
    const al = options.alpha ?? autoAlpha(fn, distance, uDominant);
    alpha[i] = al;
    // The filtered band, shifted down by its centre line kc and transformed
    // on M ≥ 2·(band width) points: the same analytic signal sampled every
    // Δ = size·dt/M, times e^(i2π·kc·binHz·t) and M/size (see the header).
    const kc = Math.round(fn / binHz);
    const reach = fn * Math.sqrt(FILTER_REACH / al);
    const kLo = Math.max(1, Math.floor((fn - reach) / binHz));
    const kHi = Math.min(size / 2 - 1, Math.ceil((fn + reach) / binHz));
    // At least 2 points per line of the band, and 16 per half-amplitude width of the envelope.
    const envelopeWidth = (0.53 * Math.sqrt(al)) / fn;
    const need = Math.max(2 * (2 * Math.max(kc - kLo, kHi - kc) + 1), Math.ceil((16 * size * dt) / envelopeWidth));
    const m = Math.min(size, fftSize(need));
    const band = new Float64Array(2 * m);
    for (let k = kLo; k <= kHi; k++) {
      const r = (k * binHz - fn) / fn;
      const g = (2 * m * Math.exp(-al * r * r)) / size;
      const q = (((k - kc) % m) + m) % m;
      band[2 * q] = g * spec[2 * k];
      band[2 * q + 1] = g * spec[2 * k + 1];
    }
    const b = inverseComplex(band);
    const step = (size * dt) / m;
    const shiftHz = kc * binHz;
    const o = i * cols;
    for (let c = 0; c < cols; c++) {
      const t = distance / velocities[c];
      if (!(t >= t0 && t <= lastTime)) {
        inst[o + c] = NaN;
        continue;
      }
      const mf = (t - t0) / step;
      // Quadratic (three-point Lagrange) interpolation of the envelope about the nearest sample.
      const mc = Math.min(Math.max(Math.round(mf), 1), m - 2);
      const u = mf - mc;
      const em = Math.sqrt(b[2 * mc - 2] ** 2 + b[2 * mc - 1] ** 2);
      const e0 = Math.sqrt(b[2 * mc] ** 2 + b[2 * mc + 1] ** 2);
      const ep = Math.sqrt(b[2 * mc + 2] ** 2 + b[2 * mc + 3] ** 2);
      const e = e0 + 0.5 * u * (ep - em) + 0.5 * u * u * (ep - 2 * e0 + em);
      power[o + c] = e > 0 ? e * e : 0;
      const pr = b[2 * mc + 2] * b[2 * mc - 2] + b[2 * mc + 3] * b[2 * mc - 1];
      const pi = b[2 * mc + 3] * b[2 * mc - 2] - b[2 * mc + 2] * b[2 * mc - 1];
      const fi = shiftHz + Math.atan2(pi, pr) / (4 * Math.PI * step);
      // A cell whose phase runs backwards (noise, or two arrivals cancelling) has no frequency.
      inst[o + c] = (pr === 0 && pi === 0) || !(fi > 0) ? NaN : fi;
    }
  }
  const rowPeak = normaliseRows(power, rows, cols);
  let top = 0;
  for (let i = 0; i < rows; i++) top = Math.max(top, rowPeak[i]);
  const strength = new Float64Array(rows);
  for (let i = 0; i < rows; i++) strength[i] = top > 0 ? rowPeak[i] / top : 0;

  // Reliability by energy and by wavelengths travelled.
  const reliability = new Uint8Array(rows * cols);
  let short = false;
  let marginal = false;
  let outside = false;
  let faint = false;
  for (let i = 0; i < rows; i++) {
    if (strength[i] < FAINT_ROW) {
      faint = true; // every cell stays UNRELIABLE (0)
      continue;
    }
    for (let c = 0; c < cols; c++) {
      const j = i * cols + c;
      const t = distance / velocities[c];
      if (!(t >= t0 && t <= lastTime)) {
        reliability[j] = UNRELIABLE;
        outside = true;
        continue;
      }
      const f = Number.isFinite(inst[j]) && inst[j] > 0 ? inst[j] : frequencies[i];
      const wavelengths = (distance * f) / velocities[c];
      if (wavelengths >= WAVELENGTHS_RELIABLE) reliability[j] = RELIABLE;
      else if (wavelengths >= WAVELENGTHS_MARGINAL) {
        reliability[j] = MARGINAL;
        marginal = true;
      } else {
        reliability[j] = UNRELIABLE;
        short = true;
      }
    }
  }

  const notes: string[] = [];
  const x = Math.round(distance * 100) / 100;
  if (short) notes.push(`Where the ${x} m travel is under ${WAVELENGTHS_MARGINAL} wavelengths, group velocities are unreliable.`);
  if (marginal) notes.push(`Where the ${x} m travel is ${WAVELENGTHS_MARGINAL}–${WAVELENGTHS_RELIABLE} wavelengths, group velocities are marginal.`);
  if (faint) notes.push(`Frequencies whose envelope peak is under ${Math.sqrt(FAINT_ROW) * 100} % of the record's strongest carry too little energy: unreliable.`);
  if (outside) notes.push('Velocities whose arrival time falls outside the record are unreliable (no samples there).');

  const airy = airyMinimum(frequencies, velocities, power, strength, inst, reliability);
  if (airy !== null) {
    const limit = AIRY_FACTOR * airy.frequency;
    for (let i = 0; i < rows; i++) {
      for (let c = 0; c < cols; c++) {
        const j = i * cols + c;
        const f = Number.isFinite(inst[j]) && inst[j] > 0 ? inst[j] : frequencies[i];
        if (f < limit) reliability[j] = UNRELIABLE;
      }
    }
    notes.push(
      `The group velocity has its minimum (Airy phase) near ${airy.frequency.toFixed(2)} Hz and ${airy.velocity.toFixed(1)} m/s; ` +
        `near and below it the multiple-filter method is biased, so frequencies under ${limit.toFixed(2)} Hz (${AIRY_FACTOR} × that) are unreliable.`,
    );
  }
  let aLo = Infinity;
  let aHi = -Infinity;
  for (const v of alpha) {
    aLo = Math.min(aLo, v);
    aHi = Math.max(aHi, v);
  }
  notes.push(
    options.alpha !== undefined
      ? `Gaussian filters with alpha = ${options.alpha} (given).`
      : `Gaussian filters with alpha from ${aLo.toFixed(1)} to ${aHi.toFixed(1)}, chosen so each envelope stays under a third of the travel time (dominant arrival ${uDominant.toFixed(0)} m/s).`,
  );
  if (options.reference !== undefined) notes.push(`Two receivers: traces ${options.reference + 1} and ${traceIndex + 1}, ${x} m apart; the trigger time cancels.`);

  return {
    method: 'multiple-filter',
    frequencies,
    velocities,
    power,
    strength,
    instantaneousFrequency: inst,
    reliability,
    notes,
    resolution: { recordSeconds: n * dt, sampleInterval: dt, spread: 0, distance, traces: options.reference !== undefined ? 2 : 1 },
    alpha,
    ...(gather.name !== undefined ? { name: gather.name } : {}),
  };
}

function farthest(offsets: Float64Array): number {
  let best = 0;
  for (let j = 1; j < offsets.length; j++) if (offsets[j] > offsets[best]) best = j;
  return best;
}

function checkIndex(index: number, count: number, field: 'trace' | 'reference'): void {
  if (!Number.isInteger(index) || index < 0 || index >= count) {
    throw new InputError(field, `The ${field} trace must be a trace number from 1 to ${count}, but it is ${Number.isInteger(index) ? index + 1 : index}.`);
  }
}

/**
 * The interior minimum of the strongest arrival's group velocity over the
 * rows (the Airy phase), or null when the curve has none: per row, the
 * velocity of the largest power among cells not UNRELIABLE, at its
 * instantaneous frequency.
 */
function airyMinimum(
  frequencies: Float64Array,
  velocities: Float64Array,
  power: Float64Array,
  strength: Float64Array,
  inst: Float64Array,
  reliability: Uint8Array,
): { frequency: number; velocity: number } | null {
  const rows = frequencies.length;
  const cols = velocities.length;
  const fs: number[] = [];
  const us: number[] = [];
  for (let i = 0; i < rows; i++) {
    if (strength[i] < AIRY_MIN_STRENGTH) continue;
    let best = -1;
    for (let c = 0; c < cols; c++) {
      const j = i * cols + c;
      if (reliability[j] === UNRELIABLE) continue;
      if (best < 0 || power[j] > power[i * cols + best]) best = c;
    }
    if (best < 0 || power[i * cols + best] < 0.5) continue;
    const f = inst[i * cols + best];
    fs.push(Number.isFinite(f) && f > 0 ? f : frequencies[i]);
    let u = velocities[best];
    if (best > 0 && best < cols - 1) {
      // Parabola through the peak cell and its neighbours.
      const y0 = power[i * cols + best - 1];
      const y1 = power[i * cols + best];
      const y2 = power[i * cols + best + 1];
      const den = y0 - 2 * y1 + y2;
      if (den < 0) u += (0.5 * (y0 - y2) / den) * (velocities[best + 1] - velocities[best - 1]) / 2;
    }
    us.push(u);
  }
  if (us.length < 3) return null;
  let m = 0;
  for (let k = 1; k < us.length; k++) if (us[k] < us[m]) m = k;
  if (m === 0 || m === us.length - 1) return null;
  if (us[0] < AIRY_RISE * us[m] || us[us.length - 1] < AIRY_RISE * us[m]) return null;
  return { frequency: fs[m], velocity: us[m] };
}
